import { describe, expect, it } from 'vitest';
import { analyzeCsv } from '../../../shared/trace';
import { drawCase } from '../../../scripts/sim2/cases';

/**
 * A far end on a lossy line, with the cable's loss known, whose long fit window also holds a step of the
 * other sign that one modelled edge cannot follow. Fitted with one edge, the end takes that step as part of
 * its own and its arrival is pulled off; with a second edge of the other sign fitted beside it, where that
 * takes at least half of what the one edge leaves and wins decisively, the end is read where it is. The traces
 * are cases of the second simulator (scripts/sim2, finite differences of the telegrapher's equations with the
 * line's loss), drawn from fixed seeds; the check values are where it put the ends, and the distance
 * tolerance is the product's, max(0.5 m, 1 %).
 */

const tolM = (d: number) => Math.max(0.5, 0.01 * d);

const describeEvents = (events: Array<{ distanceM: number; type: string; reflectionCoefficient: number }>) =>
  JSON.stringify(events.map((e) => [e.distanceM.toFixed(2), e.type, e.reflectionCoefficient.toFixed(3)]));

function analyseDrawn(seed: number, index: number) {
  const c = drawCase(seed, index, 'unit');
  const a = analyzeCsv(c.csv, c.parseOptions ?? {}, { vf: c.vf, z0Ohm: c.z0Ohm, loss: c.loss });
  return { c, a };
}

describe('a far end fitted with the step of the other sign in its window', () => {
  it('a 1.5 Ω end on 875 m of lossy pair, step record: at the end, not 15 m before it', () => {
    const { c, a } = analyseDrawn(0x9862f5a8, 18);
    expect(c.mode).toBe('step');
    const end = c.expected.find((e) => e.what.startsWith('cable end'))!;
    expect(end.distanceM).toBeCloseTo(875.02, 1);
    const last = a.events[a.events.length - 1];
    // With one edge in its window the end was read at 859.94 m.
    expect(Math.abs(last.distanceM - end.distanceM), describeEvents(a.events)).toBeLessThanOrEqual(tolM(end.distanceM));
    expect(last.type, describeEvents(a.events)).toBe('short');
  });

  it('an open end on 1283 m of lossy pair, step record: at the end, not 26 m before it', () => {
    const { c, a } = analyseDrawn(0x91b67932, 38);
    expect(c.mode).toBe('step');
    const end = c.expected.find((e) => e.what.startsWith('cable end'))!;
    expect(end.distanceM).toBeCloseTo(1282.97, 1);
    const last = a.events[a.events.length - 1];
    // With one edge in its window the end was read at 1256.90 m.
    expect(Math.abs(last.distanceM - end.distanceM), describeEvents(a.events)).toBeLessThanOrEqual(tolM(end.distanceM));
    expect(last.type, describeEvents(a.events)).toBe('open');
  });
});
