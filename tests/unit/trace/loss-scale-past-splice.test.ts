import { describe, expect, it } from 'vitest';
import { analyzeCsv } from '../../../shared/trace';
import { drawCase } from '../../../scripts/sim2/cases';

/**
 * An open end on a telecom pair whose last 242 m are a thicker pair spliced on at 74 m, pulse record, read with
 * the library's loss, which is the first pair's: past the splice the line loses less than that, and the end's
 * echo comes back sharper than the library's loss makes it. Fitted with that loss, the end's modelled edge lags
 * its arrival by more than the record's does, and the end read 7 m early (319.12 m); its fit left more than
 * the noise, where the same loss scaled down explains the window to the noise. The trace is a case of the
 * second simulator (scripts/sim2, finite differences of the telegrapher's equations with the line's loss), drawn
 * from a fixed seed; the check value is where it put the end, and the distance tolerance is the product's,
 * max(0.5 m, 1 %).
 */

const tolM = (d: number) => Math.max(0.5, 0.01 * d);

const describeEvents = (events: Array<{ distanceM: number; type: string; reflectionCoefficient: number }>) =>
  JSON.stringify(events.map((e) => [e.distanceM.toFixed(2), e.type, e.reflectionCoefficient.toFixed(3)]));

describe("an end past a change of pair, read with the first pair's loss", () => {
  it('an open end 326 m along a pair spliced to a thicker one at 74 m, pulse record: the end within 1 %', () => {
    const c = drawCase(0xd059f26c, 6, 'unit');
    expect(c.mode).toBe('pulse');
    expect(c.cableKind).toBe('pair');
    expect(c.loss.length).toBe(2);
    const end = c.expected.find((e) => e.what.startsWith('cable end'))!;
    expect(end.what).toBe('cable end (open)');
    expect(end.distanceM).toBeCloseTo(326.27, 1);
    const a = analyzeCsv(c.csv, c.parseOptions ?? {}, { vf: c.vf, z0Ohm: c.z0Ohm, loss: c.loss });
    const last = a.events[a.events.length - 1];
    expect(last.type, describeEvents(a.events)).toBe('open');
    expect(Math.abs(last.distanceM - end.distanceM), describeEvents(a.events)).toBeLessThanOrEqual(tolM(end.distanceM));
  });
});
