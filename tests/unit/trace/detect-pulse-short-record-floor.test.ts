import { describe, expect, it } from 'vitest';
import { analyzeTrace } from '../../../shared/trace';
import { rampResponse } from '../../../shared/trace/detection';
import { gaussianSource } from '../../../scripts/sim/line-model';
import { gaussianShapes, parsedTrace } from '../../support/parsed-trace';

/** The step filter (A − 3B + 3C − D)/2 over windows of w samples, summed directly on a sampled ramp. */
function directRampResponse(rampSamples: number, w: number): number {
  const n = 8 * w + rampSamples;
  const u = (i: number) => Math.min(1, Math.max(0, (i - 4 * w + 1) / rampSamples));
  const mean = (a: number) => {
    let s = 0;
    for (let i = a; i < a + w; i++) s += u(i);
    return s / w;
  };
  let best = 0;
  for (let i = 2 * w; i <= n - 2 * w; i++) {
    const f = (mean(i - 2 * w) - 3 * mean(i - w) + 3 * mean(i) - mean(i + w)) / 2;
    best = Math.max(best, Math.abs(f));
  }
  return best;
}

describe("the step filter's reading of a ramp", () => {
  it('reads an edge shorter than its window almost whole and a ramp over windows at its corners only', () => {
    // A step inside one window: F = its height by the filter's construction.
    expect(rampResponse(0.5, 40)).toBeCloseTo(1, 1);
    // Summed directly on a ramp sampled at 100 samples a window (the function models 32).
    for (const r of [0.5, 1, 2, 2.5, 4])
      expect(Math.abs(rampResponse(r * 40, 40) - directRampResponse(r * 100, 100))).toBeLessThan(0.01);
    // A pulse echo's ramp in the running sum is 2.5 of the finest windows: about a seventh of its height.
    expect(rampResponse(100, 40)).toBeGreaterThan(0.12);
    expect(rampResponse(100, 40)).toBeLessThan(0.15);
  });
});

describe('a weak echo just past the launch, in a pulse record too short for the echo-ramp scale', () => {
  // A launch pulse 171 samples wide (rising in 21) at sample 45, sampled every 0.5 ns, in a record of
  // 764 samples: 2·w0 (w0 = 0.4 of the width) does not fit four windows in the search, so only the
  // finest scale runs. A shunt of ρ = −0.033 at 285 samples of round trip, 0.0004 of white noise.
  const trace = (seed: number, rho: number) => {
    const rnd = gaussianSource(seed);
    const { pulse } = gaussianShapes(21);
    const y = new Float64Array(764).map((_, i) => 0.13 + pulse(i, 45, 171) + rho * pulse(i, 45 + 285, 171) + 0.0004 * rnd());
    return analyzeTrace(parsedTrace(y, { dtS: 5e-10 }), { vf: 0.55 });
  };

  it('is found where it is, with its ρ', () => {
    // d = VF·c·t/2 = 0.55 × 0.29979 m/ns × 142.5 ns / 2 = 11.75 m.
    for (let seed = 1; seed <= 5; seed++) {
      const a = trace(seed, -0.033);
      expect(a.mode).toBe('pulse');
      expect(a.events).toHaveLength(1);
      expect(Math.abs(a.events[0].distanceM - 11.75)).toBeLessThan(0.5);
      expect(a.events[0].reflectionCoefficient).toBeGreaterThan(-0.04);
      expect(a.events[0].reflectionCoefficient).toBeLessThan(-0.026);
    }
  });

  it('reports nothing from the same record without the echo', () => {
    for (let seed = 1; seed <= 5; seed++) expect(trace(seed, 0).events).toHaveLength(0);
  });
});
