import { describe, expect, it } from 'vitest';
import { analyzeCsv } from '../../../shared/trace';
import { drawCase } from '../../../scripts/sim2/cases';

/**
 * The step filter's coarsest scales hold too few outputs for a robust noise measure, and the coarsest of
 * all too few to measure it at all: there the noise is taken from the finer scales. In a pulse record
 * (whose working signal is the running sum, where slow noise builds up as a walk) the spread still read at
 * a scale of few outputs (differences four windows apart, held within three times what the finer scales
 * allow) counts too: a record whose slow noise already shows one scale finer is not read, at the scale
 * where its noise cannot be measured, as if it had none. The check values are the simulator's
 * (scripts/sim2, finite differences of the telegrapher's equations with the line's loss), drawn from
 * fixed seeds; the distance tolerance is the product's, max(0.5 m, 1 %).
 */

const tolM = (d: number) => Math.max(0.5, 0.01 * d);

const describeEvents = (events: Array<{ distanceM: number; type: string; reflectionCoefficient: number }>) =>
  JSON.stringify(events.map((e) => [e.distanceM.toFixed(2), e.type, e.reflectionCoefficient.toFixed(3)]));

function analyseDrawn(seed: number, index: number, withLoss: boolean) {
  const c = drawCase(seed, index, 'unit');
  const a = analyzeCsv(c.csv, c.parseOptions ?? {}, { vf: c.vf, z0Ohm: c.z0Ohm, loss: withLoss ? c.loss : undefined });
  return { c, a };
}

describe('slow noise read at a coarse scale of a pulse record is carried to the scales where it cannot be measured', () => {
  for (const withLoss of [true, false]) {
    it(`49 m of 50 Ω coax ending in its own impedance, pulse record${withLoss ? ', cable loss known' : ''}: no event`, () => {
      const { c, a } = analyseDrawn(0x90917761, 52, withLoss);
      expect(c.mode).toBe('pulse');
      expect(c.expected.length).toBe(1);
      expect(c.expected[0].what).toBe('cable end (matched)');
      expect(c.expected[0].distanceM).toBeCloseTo(48.82, 1);
      // The slow tail past the end was read at the coarsest scale as rises at 43.3 m and 72.1 m
      // (with the loss known) or as a drop at 47.6 m and a rise at 75.0 m (without).
      expect(a.events.length, describeEvents(a.events)).toBe(0);
    });
  }

  it('6.4 m of pair with a 33 Ω series fault at 3.84 m, matched end, pulse record: the fault and nothing past the end', () => {
    const { c, a } = analyseDrawn(0x5a656ceb, 75, true);
    expect(c.mode).toBe('pulse');
    const fault = c.expected.find((e) => e.required)!;
    expect(fault.distanceM).toBeCloseTo(3.84, 1);
    // A rise of ρ 0.013 was read at 14.8 m, past the 6.44 m end.
    expect(a.events.length, describeEvents(a.events)).toBe(1);
    expect(Math.abs(a.events[0].distanceM - fault.distanceM)).toBeLessThanOrEqual(tolM(fault.distanceM));
    expect(a.events[0].type).toBe('impedance-rise');
  });
});
