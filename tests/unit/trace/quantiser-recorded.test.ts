import { describe, expect, it } from 'vitest';
import { findLaunch } from '../../../shared/trace/launch';
import { estimateNoise, estimateSlowNoise } from '../../../shared/trace/noise';
import { buildWorkingSignal } from '../../../shared/trace/signal';
import type { TraceRecord } from '../../../shared/trace/steps';
import { gaussianSource } from '../../../scripts/sim/line-model';
import { gaussianShapes } from '../../support/parsed-trace';

/**
 * An 8-bit recorder over ±4 V (a step of 8 / 256 = 0.03125 V) records a 2 V launch pulse with noise of
 * 0.005 V, under half a step. A lossy line's creep taken out of the record (here a slow 0.0004 V ramp
 * standing for it) leaves samples off the recorder's grid; the quantiser's step is still the
 * recorded one, 0.03125 / 2 = 0.015625 launch peaks. The check values are the generator's inputs.
 */
describe('the quantiser step of a corrected pulse record', () => {
  it('is read on the record as recorded', () => {
    const { pulse } = gaussianShapes(4);
    const rnd = gaussianSource(9);
    const q = 8 / 256;
    const n = 2000;
    const recorded = new Float64Array(n).map((_, i) => Math.round((2 * pulse(i, 100, 20) + 0.005 * rnd()) / q) * q);
    const corrected = recorded.map((v, i) => v - 0.0004 * Math.sin(i / 300));
    const rec: TraceRecord = { y: corrected, t: new Float64Array(n).map((_, i) => i * 1e-9), n, dt: 1e-9, unit: 'V' };
    const L = findLaunch(rec, 'pulse', 20, estimateSlowNoise(corrected));
    expect(L.mode).toBe('pulse');
    expect(buildWorkingSignal(rec, L, estimateNoise(corrected)).quantRaw).toBe(0);
    const sig = buildWorkingSignal(rec, L, estimateNoise(corrected), undefined, recorded);
    expect(sig.quantRaw).toBeCloseTo(q / L.height, 6);
    expect(L.height).toBeCloseTo(2, 1);
  });
});
