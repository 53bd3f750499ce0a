import { describe, expect, it } from 'vitest';
import { analyzeTrace } from '../../../shared/trace';
import { findLaunch } from '../../../shared/trace/launch';
import { estimateNoise, estimateSlowNoise } from '../../../shared/trace/noise';
import { buildWorkingSignal } from '../../../shared/trace/signal';
import type { TraceRecord } from '../../../shared/trace/steps';
import { gaussianSource } from '../../../scripts/sim/line-model';
import { gaussianShapes, parsedTrace } from '../../support/parsed-trace';

/** An 8-bit recorder over ±4 V: a step of 8/256 = 0.03125 V, rounding to the nearest level. */
const Q = 8 / 256;
const quantise = (v: number) => Math.round(v / Q) * Q;
const N = 20000;
const { pulse } = gaussianShapes(4);

/**
 * A 2 V launch pulse 20 samples wide at sample 100, read by that recorder with white noise of 0.3 of a
 * step, the line resting 0.35 of a step above a level: the samples' median sits on the level, 0.011 V
 * (0.55 % of the launch) below where the line rests; the noise dithers the levels, so their mean does not.
 */
function recorded(echo: (i: number) => number, seed: number): Float64Array {
  const rnd = gaussianSource(seed);
  return new Float64Array(N).map((_, i) => quantise(2 * pulse(i, 100, 20) + echo(i) + 0.35 * Q + 0.3 * Q * rnd()));
}

describe('the baseline of a pulse record from a coarse recorder', () => {
  it('is read between the recorder’s levels, so the running sum stays level where nothing reflects', () => {
    const y = recorded(() => 0, 41);
    const rec: TraceRecord = { y, t: new Float64Array(N).map((_, i) => i * 1e-9), n: N, dt: 1e-9, unit: 'V' };
    const L = findLaunch(rec, 'auto', null, estimateSlowNoise(y));
    expect(L.mode).toBe('pulse');
    const sig = buildWorkingSignal(rec, L, estimateNoise(y));
    // Over the 19 800 samples after the launch a bias of 0.35 of a step (0.0055 of the launch peak) would
    // add 19 800 × 0.0055 / 20 ≈ 5.4 launch areas; the noise of the sum is √19 800 × 0.3 × 0.0156 / 20 ≈ 0.033 of one.
    const drift = sig.u[N - 1] - sig.u[300];
    expect(Math.abs(drift)).toBeLessThan(0.15);
  });

  it('still reads an echo’s distance and ρ from its area on that recorder', () => {
    // An echo of ρ = 0.25 (0.5 V, 20 samples wide) at 10 100, 10 000 ns after the launch:
    // d = 0.66 × 0.2998 m/ns × 10 000 ns / 2 = 989.3 m.
    const y = recorded((i) => 0.5 * pulse(i, 10100, 20), 42);
    const a = analyzeTrace(parsedTrace(y), { vf: 0.66 });
    expect(a.events).toHaveLength(1);
    expect(Math.abs(a.events[0].distanceM - 989.3)).toBeLessThan(3);
    expect(a.events[0].type).toBe('impedance-rise');
    expect(Math.abs(a.events[0].reflectionCoefficient - 0.25)).toBeLessThan(0.03);
  });
});
