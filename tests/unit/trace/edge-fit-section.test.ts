import { describe, expect, it } from 'vitest';
import { analyzeCsv } from '../../../shared/trace';
import { drawCase } from '../../../scripts/sim2/cases';

/**
 * A section of different cable (a wet stretch: slower, lower impedance) far down a lossy line, with the
 * cable's loss known. The line spreads each of its two ends, a drop in and a rise out, over about the
 * section's own length, so the two make one slow dip that one edge, causal or symmetric, cannot follow:
 * read as one edge, the dip was one drop between the two ends (1668.31 m). Fitted as two edges of the
 * line's own shape and of opposite signs, both ends are found and reported. The trace is a case of the
 * second simulator (scripts/sim2, finite differences of the telegrapher's equations with the line's loss),
 * drawn from a fixed seed; the check values are where it put the ends, and the distance tolerance is the
 * product's, max(0.5 m, 1 %).
 */

const tolM = (d: number) => Math.max(0.5, 0.01 * d);

const listed = (events: Array<{ distanceM: number; type: string; reflectionCoefficient: number }>) =>
  JSON.stringify(events.map((e) => [e.distanceM.toFixed(2), e.type, e.reflectionCoefficient.toFixed(3)]));

describe('a section whose two spread ends make one dip', () => {
  it('a wet section on 1986 m of lossy 75 Ω coax, step record: both of its ends, not one drop between them', () => {
    const c = drawCase(0xf90c9518, 79, 'unit');
    expect(c.mode).toBe('step');
    const start = c.expected.find((e) => e.what === 'wet section start')!;
    const end = c.expected.find((e) => e.what === 'wet section end')!;
    expect(start.distanceM).toBeCloseTo(1590.73, 1);
    expect(end.distanceM).toBeCloseTo(1772.29, 1);
    const a = analyzeCsv(c.csv, c.parseOptions ?? {}, { vf: c.vf, z0Ohm: c.z0Ohm, loss: c.loss });
    const near = (d: number) => a.events.filter((e) => Math.abs(e.distanceM - d) <= tolM(d));
    expect(near(start.distanceM).map((e) => e.type), listed(a.events)).toEqual(['impedance-drop']);
    expect(near(end.distanceM).map((e) => e.type), listed(a.events)).toEqual(['impedance-rise']);
    // Nothing is reported inside the section, between its ends.
    const inside = a.events.filter((e) => e.distanceM > start.distanceM + tolM(start.distanceM) && e.distanceM < end.distanceM - tolM(end.distanceM));
    expect(inside, listed(a.events)).toEqual([]);
    // The short at the end of the line, with the section's ends taken out of its window, is read where it is.
    const short = c.expected.find((e) => e.type === 'short')!;
    expect(near(short.distanceM).map((e) => e.type), listed(a.events)).toEqual(['short']);
  });
});
