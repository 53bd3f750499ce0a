import { describe, expect, it } from 'vitest';
import { analyzeTrace } from '../../../shared/trace';
import { findLaunch } from '../../../shared/trace/launch';
import { estimateSlowNoise } from '../../../shared/trace/noise';
import type { TraceRecord } from '../../../shared/trace/steps';
import { gaussianSource } from '../../../scripts/sim/line-model';
import { gaussianShapes, parsedTrace } from '../../support/parsed-trace';

/**
 * Records in volts with no pre-trigger (1 ns samples, 2000 of them, the axis starting at the
 * launch): they open at the launch's level and fall at sample 300. The check values are the
 * generator's inputs.
 */
const N = 2000;
const FALL = 300;
const VF = 0.66;
const { edge } = gaussianShapes(12);
const rec = (y: Float64Array): TraceRecord => ({ y, t: new Float64Array(N).map((_, i) => i * 1e-9), n: N, dt: 1e-9, unit: 'V' });

/** d = VF·c·t/2, c = 0.299792458 m/ns (SI definition), for a round trip of `samples` 1 ns samples. */
const metres = (samples: number) => (VF * 0.299792458 * samples) / 2;

describe('a record in volts that starts during the launch', () => {
  it('is a step record when it rests far from 0 V after the fall: a fault of ρ = −0.55', () => {
    // A 2 V step into a shunt of ρ = −0.55: the level drops to 2 × 0.45 = 0.9 V and stays
    // there, 1.6 times the 1.1 V drop away from 0 V, where a pulse record's line idles.
    const rnd = gaussianSource(31);
    const y = new Float64Array(N).map((_, i) => 2 - 1.1 * edge(i - FALL) + 0.01 * rnd());
    const L = findLaunch(rec(y), 'auto', null, estimateSlowNoise(y));
    expect(L.mode).toBe('step');
    const a = analyzeTrace(parsedTrace(y, { dtS: 1e-9 }), { vf: VF });
    expect(a.mode).toBe('step');
    // 0.66 × 0.2998 m/ns × 300 ns / 2 = 29.7 m, ρ = −0.55 as read against the 2 V incident level
    // (the reported ρ is further corrected by the engine's own loss estimate).
    const drop = a.events.filter((e) => Math.abs(e.distanceM - metres(FALL)) < 1.5);
    expect(drop).toHaveLength(1);
    expect(Math.abs((drop[0].reflectionCoefficientRaw ?? NaN) + 0.55)).toBeLessThan(0.05);
  });

  it('is a pulse record when it falls back near 0 V, even on a small offset', () => {
    // A 2 V launch pulse seen from its middle, falling to a +0.3 V offset (0.15 of its height)
    // and an echo of 0.4 of it 900 samples later.
    const rnd = gaussianSource(32);
    const y = new Float64Array(N).map(
      (_, i) => 0.3 + 2 * (1 - edge(i - FALL)) + 0.8 * (edge(i - 900) - edge(i - 1200)) + 0.01 * rnd(),
    );
    const L = findLaunch(rec(y), 'auto', null, estimateSlowNoise(y));
    expect(L.mode).toBe('pulse');
    expect(L.onsetInRecord).toBe(false);
    expect(Math.abs(L.baseline - 0.3)).toBeLessThan(0.05);
  });
});
