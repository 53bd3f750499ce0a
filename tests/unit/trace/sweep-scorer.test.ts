import { describe, expect, it } from 'vitest';
import { buildSweep, scoreCase, type ScoredEvent } from '../../../scripts/sim/sweep';

// The scorer's own rules, on a sweep case's ground truth: a 600 m telecom pair (R_dc 0.18 Ω/m)
// with a 40 Ω shunt at 260 m (ρ = −5/9 on 100 Ω, Pozar eq. 2.35) and its open end, optional
// because only 0.198 of it returns past the shunt.
const c = buildSweep().find((x) => x.id.startsWith('26-'))!;
const ev = (over: Partial<ScoredEvent>): ScoredEvent => ({
  distanceM: 260,
  type: 'impedance-drop',
  likelyMultipleOf: null,
  reflectionCoefficient: -0.55,
  windowStartM: 255,
  windowEndM: 265,
  lossCorrected: true,
  ...over,
});

describe('the sweep scorer', () => {
  it('reads an uncorrected ρ on a resistive line as a bound: the sign must hold and the size not exceed the feature’s', () => {
    expect(scoreCase(c, [ev({ reflectionCoefficient: -0.3, lossCorrected: false })]).ok).toBe(true);
    // Corrected, the same reading is simply wrong.
    expect(scoreCase(c, [ev({ reflectionCoefficient: -0.3 })]).problems[0]).toMatch(/has ρ -0.300, expected -0.556/);
    // Never the wrong sign, never bigger than the feature.
    expect(scoreCase(c, [ev({ reflectionCoefficient: 0.3, lossCorrected: false })]).ok).toBe(false);
    expect(scoreCase(c, [ev({ reflectionCoefficient: -0.95, lossCorrected: false })]).ok).toBe(false);
  });

  it('takes an imprecise report of an optional feature whose window holds it, with its ρ sign, as that feature, and nothing else', () => {
    const shunt = ev({});
    const far = { type: 'impedance-rise', reflectionCoefficient: 0.09, windowStartM: 575, windowEndM: 654, lossCorrected: false };
    expect(scoreCase(c, [shunt, ev({ ...far, distanceM: 614 })]).ok).toBe(true);
    // A window that misses it, the wrong sign, or an echo flag: a false event as before.
    expect(scoreCase(c, [shunt, ev({ ...far, distanceM: 614, windowStartM: 605 })]).problems).toEqual(['false event impedance-rise at 614.00 m']);
    expect(scoreCase(c, [shunt, ev({ ...far, distanceM: 614, reflectionCoefficient: -0.09 })]).ok).toBe(false);
    // Only one report can stand for it.
    expect(scoreCase(c, [shunt, ev({ ...far, distanceM: 614 }), ev({ ...far, distanceM: 630 })]).problems).toEqual(['false event impedance-rise at 630.00 m']);
  });
});
