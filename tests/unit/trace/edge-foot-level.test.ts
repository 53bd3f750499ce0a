import { describe, expect, it } from 'vitest';
import { classifyEvent, ownReflections } from '../../../shared/trace/classify';
import { fitEdges } from '../../../shared/trace/edge-fit';
import { findLaunch } from '../../../shared/trace/launch';
import { estimateNoise, estimateSlowNoise } from '../../../shared/trace/noise';
import { buildWorkingSignal } from '../../../shared/trace/signal';
import type { TraceRecord } from '../../../shared/trace/steps';
import { gaussianSource } from '../../../scripts/sim/line-model';
import { gaussianShapes } from '../../support/parsed-trace';

/**
 * A step record in volts that starts after its launch (no launch edge in it), resting at the 2 V
 * incident level, with one edge: an end of ρ = +0.9 (+1.8 V) whose 10–90 % rise takes 12 samples,
 * its middle at sample 400, on 5 mV of noise. With no launch edge the instrument's rise is unknown
 * and the step filter may find such an edge at its finest scale, a window of two samples centred on
 * its middle; the level before it must then be read where the edge has not begun, not on its foot
 * (two samples before the middle the edge has already risen to a third of its height). The check
 * values are the generator's inputs.
 */
function measured() {
  const { edge } = gaussianShapes(12);
  const rnd = gaussianSource(7);
  const y = new Float64Array(600).map((_, i) => 2 + 1.8 * edge(i - 400) + 0.005 * rnd());
  const rec: TraceRecord = { y, t: new Float64Array(600).map((_, i) => i * 1e-10), n: 600, dt: 1e-10, unit: 'V' };
  const launch = findLaunch(rec, 'auto', null, estimateSlowNoise(y));
  const signal = buildWorkingSignal(rec, launch, estimateNoise(y));
  const [m] = fitEdges({ rec, launch, signal, rhoMin: 0.005 }, [{ i: 400, w: 2, sign: 1, f: 0, snr: 50 }]);
  return { m, launch };
}

describe('the level before an edge much slower than the step filter that found it', () => {
  it('is read before the edge, so the edge reads its whole height and an end of ρ 0.9 is an open', () => {
    const { m, launch } = measured();
    expect(launch.found).toBe(false);
    // The level before is the incident level (0 in the working signal, in launch heights).
    expect(Math.abs(m.levelBefore ?? NaN)).toBeLessThan(0.02);
    // ρ = 1.8 V / 2 V = 0.9.
    expect(Math.abs(m.height - 0.9)).toBeLessThan(0.03);
    // Tangent onset (onset.ts) of a Gaussian edge of σ = 12 / 2.5631 = 4.68 samples: its 10 % point lies
    // 1.2816σ = 6.0 samples before the middle, and the line through it and the 50 % point meets the
    // level before 6.0 × 0.1 / 0.4 = 1.5 samples earlier, at 400 − 7.5 = 392.5.
    expect(Math.abs(m.onsetIdx - 392.5)).toBeLessThan(0.5);
    const own = ownReflections([m], [false])[0];
    expect(Math.abs(own.rho - 0.9)).toBeLessThan(0.03);
    expect(classifyEvent(m, own, 0)).toBe('open');
  });
});
