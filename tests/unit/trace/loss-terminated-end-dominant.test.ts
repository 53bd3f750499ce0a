import { describe, expect, it } from 'vitest';
import { analyzeCsv } from '../../../shared/trace';
import { drawCase } from '../../../scripts/sim2/cases';

/**
 * A matched end on a lossy pair, step record, with the cable's loss known, on a record so clean that the
 * end's modelled shape (the incident creep reversed) leaves more than the noise: the simulator's line and
 * the engine's model differ a little, and at 69 dB that small misfit stands above the noise. The end's
 * shape still leaves under a tenth of what a plain edge or a fault with line past it leaves, and is read;
 * a plain edge put the end 16 m late as a drop of ρ −0.07. The trace is a case of the second simulator
 * (scripts/sim2, finite differences of the telegrapher's equations with the line's loss), drawn from a
 * fixed seed; the check value is where it put the end, and the distance tolerance is the product's,
 * max(0.5 m, 1 %).
 */

const tolM = (d: number) => Math.max(0.5, 0.01 * d);

const describeEvents = (events: Array<{ distanceM: number; type: string; reflectionCoefficient: number }>) =>
  JSON.stringify(events.map((e) => [e.distanceM.toFixed(2), e.type, e.reflectionCoefficient.toFixed(3)]));

describe('a matched end whose shape explains its window far better than any other, though not to the noise', () => {
  it('a matched end on 212 m of lossy pair, step record: at the end with ρ about 0, nothing past it', () => {
    const c = drawCase(0x170efa3f, 23, 'unit');
    const a = analyzeCsv(c.csv, c.parseOptions ?? {}, { vf: c.vf, z0Ohm: c.z0Ohm, loss: c.loss });
    expect(c.mode).toBe('step');
    const end = c.expected.find((e) => e.what.startsWith('cable end'))!;
    expect(end.what).toBe('cable end (matched)');
    expect(end.distanceM).toBeCloseTo(212.16, 1);
    const last = a.events[a.events.length - 1];
    expect(Math.abs(last.distanceM - end.distanceM), describeEvents(a.events)).toBeLessThanOrEqual(tolM(end.distanceM));
    expect(Math.abs(last.reflectionCoefficient), describeEvents(a.events)).toBeLessThan(0.02);
    expect(a.events.filter((e) => e.distanceM > end.distanceM + tolM(end.distanceM)), describeEvents(a.events)).toEqual([]);
  });
});
