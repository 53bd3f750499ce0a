import { describe, expect, it } from 'vitest';
import { analyzeTrace } from '../../../shared/trace';
import { findLaunch } from '../../../shared/trace/launch';
import { estimateSlowNoise } from '../../../shared/trace/noise';
import type { TraceRecord } from '../../../shared/trace/steps';
import { gaussianSource } from '../../../scripts/sim/line-model';
import { gaussianShapes, parsedTrace } from '../../support/parsed-trace';

/**
 * Records in volts with no pre-trigger (1 ns samples, 2000 of them, the axis starting at the
 * launch's rising half-height point) that open at a 2 V level and fall at sample 700, over a
 * third of the record, so the launch fills too much of it to be read as a narrow pulse before
 * the record. The check values are the generator's inputs.
 */
const N = 2000;
const FALL = 700;
const VF = 0.66;
const { edge } = gaussianShapes(40);
const rec = (y: Float64Array): TraceRecord => ({ y, t: new Float64Array(N).map((_, i) => i * 1e-9), n: N, dt: 1e-9, unit: 'V' });

/** d = VF·c·t/2, c = 0.299792458 m/ns (SI definition), for a round trip of `samples` 1 ns samples. */
const metres = (samples: number) => (VF * 0.299792458 * samples) / 2;

describe('a record in volts that starts during a wide launch', () => {
  it('is a pulse record when, after falling near 0 V, it returns sooner and further than a step past a short can', () => {
    // A 2 V pulse 700 samples wide, then an echo of ρ = +0.5 (1 V), 700 samples wide, at sample 1250:
    // its top rests longer than the record does at 0 V after the launch. Read as a step, the fall would
    // be a short (level 0 V) and the 1 V return 550 samples later, before twice the fall's time, no line
    // beyond a short and no source re-reflection can give.
    const rnd = gaussianSource(41);
    const y = new Float64Array(N).map((_, i) => 2 * (1 - edge(i - FALL)) + 1 * (edge(i - 1250) - edge(i - 1950)) + 0.01 * rnd());
    const L = findLaunch(rec(y), 'auto', null, estimateSlowNoise(y));
    expect(L.mode).toBe('pulse');
    expect(L.onsetInRecord).toBe(false);
    expect(Math.abs(L.baseline)).toBeLessThan(0.01);
    expect(Math.abs(L.height - 2)).toBeLessThan(0.02);
    expect(Math.abs((L.widthSamples ?? NaN) - FALL)).toBeLessThanOrEqual(2);
    const a = analyzeTrace(parsedTrace(y, { dtS: 1e-9 }), { vf: VF });
    expect(a.mode).toBe('pulse');
    // One echo, read against the 0 V the record rests at just past the launch (not against the echo's
    // own top), at 0.66 × 0.2998 m/ns × 1250 ns / 2 = 123.7 m, of ρ = 0.5 (its area over the launch's).
    expect(a.events).toHaveLength(1);
    expect(Math.abs(a.events[0].distanceM - metres(1250))).toBeLessThan(1);
    expect(Math.abs((a.events[0].reflectionCoefficientRaw ?? NaN) - 0.5)).toBeLessThan(0.03);
  });

  it('stays a step record when the level past the fall climbs back by bounces in a low-impedance section', () => {
    // A 2 V step into a section of ρ = −0.9 (level 2 × 0.1 = 0.2 V) ending 300 samples (round trip)
    // further on in an open: each round trip of the section returns (1 − 0.9²) × 0.9^k of the step,
    // 0.38 V, 0.34 V, 0.31 V …, climbing towards the open's level, no faster than a step record can.
    const rnd = gaussianSource(42);
    const y = new Float64Array(N).map((_, i) => {
      let v = 2 - 1.8 * edge(i - FALL);
      for (let k = 0; k < 6; k++) v += 2 * (1 - 0.81) * 0.9 ** k * edge(i - FALL - 300 * (k + 1));
      return v + 0.01 * rnd();
    });
    const L = findLaunch(rec(y), 'auto', null, estimateSlowNoise(y));
    expect(L.mode).toBe('step');
    expect(L.found).toBe(false);
    // The incident level is where the record opens.
    expect(Math.abs(L.height - 2)).toBeLessThan(0.02);
  });
});
