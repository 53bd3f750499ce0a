import { describe, expect, it } from 'vitest';
import { detectEdges } from '../../../shared/trace/detection';
import { findLaunch } from '../../../shared/trace/launch';
import { estimateNoise, estimateSlowNoise } from '../../../shared/trace/noise';
import { buildWorkingSignal } from '../../../shared/trace/signal';
import type { TraceRecord } from '../../../shared/trace/steps';
import { gaussianSource } from '../../../scripts/sim/line-model';

/** An 8-bit recorder over ±4 V: a step of 8/256 = 0.03125 V, rounding to the nearest level. */
const Q = 8 / 256;
const quantise = (v: number) => Math.round(v / Q) * Q;
const N = 4000;

/**
 * A 2 V step record of a line with no reflection: slow noise of 0.35 of a recorder step (correlated over
 * 10 samples) and white noise of 0.05 of a step, sitting 0.2 of a step off a level, then the recorder's
 * rounding. The level flickers to its neighbour in bursts, so most differences of the step filter's
 * outputs are ties and their median understates the spread.
 */
function flickering(seed: number): TraceRecord {
  const rnd = gaussianSource(seed);
  const a = Math.exp(-1 / 10);
  let slow = 0;
  const y = new Float64Array(N).map((_, i) => {
    slow = a * slow + Math.sqrt(1 - a * a) * rnd();
    return quantise((i >= 200 ? 2 : 0) + 0.2 * Q + 0.35 * Q * slow + 0.05 * Q * rnd());
  });
  return { y, t: new Float64Array(N).map((_, i) => i * 1e-9), n: N, dt: 1e-9, unit: 'V' };
}

describe('a coarse recorder whose level flickers in bursts', () => {
  it('holds the false events from noise near the stated rate though the filter’s outputs tie', () => {
    // 1 false event per 100 traces is the target: over 20 noise-only records more than 2 would happen by
    // chance under 2 % of the time (Poisson, mean 0.2). Read from the median of tied outputs, the threshold
    // let through about 3 a record.
    let falseEvents = 0;
    for (let s = 0; s < 20; s++) {
      const rec = flickering(500 + s);
      const L = findLaunch(rec, 'auto', null, estimateSlowNoise(rec.y));
      const sig = buildWorkingSignal(rec, L, estimateNoise(rec.y));
      falseEvents += detectEdges(sig, { falseEventsPerTrace: 0.01, rhoMin: 0 }).candidates.length;
    }
    expect(falseEvents).toBeLessThanOrEqual(2);
  });
});
