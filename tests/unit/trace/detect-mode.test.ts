import { describe, expect, it } from 'vitest';
import { analyzeTrace } from '../../../shared/trace';
import { findLaunch } from '../../../shared/trace/launch';
import { estimateSlowNoise } from '../../../shared/trace/noise';
import type { TraceRecord } from '../../../shared/trace/steps';
import { gaussianSource } from '../../../scripts/sim/line-model';
import { parsedTrace } from '../../support/parsed-trace';

const record = (y: Float64Array, dt = 1e-9): TraceRecord => {
  const n = y.length;
  return { y, t: new Float64Array(n).map((_, i) => i * dt), n, dt, unit: 'V' };
};
const parsed = (r: TraceRecord) => parsedTrace(r.y, { timeS: r.t });

/** erfc by Abramowitz and Stegun, "Handbook of Mathematical Functions" (1964), eq. 7.1.26 (error under 1.5e-7). */
function erfc(x: number): number {
  const t = 1 / (1 + 0.3275911 * x);
  const poly = t * (0.254829592 + t * (-0.284496736 + t * (1.421413741 + t * (-1.453152027 + t * 1.061405429))));
  return poly * Math.exp(-x * x);
}

/** A linear edge from 0 to 1 over `rise` samples starting at `at`. */
const ramp = (i: number, at: number, rise: number) => Math.min(1, Math.max(0, (i - at) / rise));

const LAUNCH = 500;
const RISE = 4;
const ROUND_TRIP = 800;
const N = 4000;

describe('step or pulse, from the whole record', () => {
  it('reads a step into a near short as a step: the fall came back along the lossy line', () => {
    // A skin-effect line turns a reflected step into erfc(√(τ/t)) (R. L. Wigington and
    // N. S. Nahman, "Transient analysis of coaxial cables considering skin effect",
    // Proc. IRE 45 (1957) 166). A shunt of ρ = −0.97 at 800 samples of round trip, τ = 2
    // samples: the fall reaches 90 % within 2 samples but 10 % only after about 490 (from
    // erfc(x) = 0.93 at x ≈ 0.064), and the level stays 3–8 % of the step off the baseline
    // for the rest of the record, which looks much like a pulse's return to it.
    const rnd = gaussianSource(11);
    const tau = 2;
    const y = new Float64Array(N).map((_, i) => {
      const t = i - LAUNCH - ROUND_TRIP;
      const back = t > 0 ? 0.97 * erfc(Math.sqrt(tau / t)) : 0;
      return ramp(i, LAUNCH, RISE) - back + 0.002 * rnd();
    });
    const rec = record(y);
    const L = findLaunch(rec, 'auto', null, estimateSlowNoise(y));
    expect(L.mode).toBe('step');
    const a = analyzeTrace(parsed(rec), { vf: 0.66 });
    expect(a.mode).toBe('step');
    // The fault: d = VF·c·t/2 = 0.66 × 0.2998 m/ns × 800 ns / 2 = 79.1 m; found as a short.
    const near = a.events.filter((e) => Math.abs(e.distanceM - 79.1) < 3);
    expect(near).toHaveLength(1);
    expect(near[0].reflectionCoefficient).toBeLessThan(-0.8);
  });

  it('keeps a pulse of the same width a pulse: it falls as fast as it rose', () => {
    const rnd = gaussianSource(12);
    const y = new Float64Array(N).map((_, i) => ramp(i, LAUNCH, RISE) - ramp(i, LAUNCH + ROUND_TRIP, RISE) + 0.002 * rnd());
    const L = findLaunch(record(y), 'auto', null, estimateSlowNoise(y));
    expect(L.mode).toBe('pulse');
    // Its width at half height is the 800 samples between its two edges.
    expect(Math.abs((L.widthSamples ?? 0) - ROUND_TRIP)).toBeLessThanOrEqual(RISE);
  });
});
