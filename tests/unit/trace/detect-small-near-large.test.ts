import { describe, expect, it } from 'vitest';
import { analyzeTrace } from '../../../shared/trace';
import { gaussianSource } from '../../../scripts/sim/line-model';
import { parsedTrace } from '../../support/parsed-trace';

const N = 8000;

/**
 * A step record (1 ns samples): the launch to 1 V at sample 200, a drop of 0.5 at sample 3000 and a step
 * of `small` (±0.03, a sixteenth of the drop) `gap` samples after it, on white noise of 0.002.
 */
function record(seed: number, gap: number, small: number): Float64Array {
  const rnd = gaussianSource(seed);
  return new Float64Array(N).map((_, i) => (i >= 200 ? 1 : 0) - (i >= 3000 ? 0.5 : 0) + (i >= 3000 + gap ? small : 0) + 0.002 * rnd());
}

/** Distance of sample i from the launch at VF 0.66: 0.66 × 0.29979 m/ns × (i − 200) ns / 2. */
const metres = (i: number) => (0.66 * 0.299792458 * (i - 200)) / 2;

describe('a small step close after a large one', () => {
  it('is reported on its own, at its distance and with its height, not taken for the large step’s side lobe', () => {
    // The step filter answers the drop with +¼ (half its height, against it) one window to either side, far more
    // than the small step's ±0.03 at the coarser scales: the small step must be seen at a scale whose windows
    // keep the two apart, and not be dropped as that lobe.
    for (const seed of [1, 2])
      for (const gap of [60, 250])
        for (const small of [0.03, -0.03]) {
          const a = analyzeTrace(parsedTrace(record(seed, gap, small)), { vf: 0.66 });
          expect(a.mode).toBe('step');
          expect(a.events).toHaveLength(2);
          const [big, near] = a.events;
          // 2800 ns after the launch: 276.99 m.
          expect(big.distanceM).toBeCloseTo(metres(3000), 0);
          expect(big.reflectionCoefficientRaw ?? big.reflectionCoefficient).toBeCloseTo(-0.5, 1);
          // 60 samples later: 282.93 m; 250 later: 301.72 m (a sample is 0.099 m).
          expect(Math.abs(near.distanceM - metres(3000 + gap))).toBeLessThan(0.5);
          expect(near.type).toBe(small > 0 ? 'impedance-rise' : 'impedance-drop');
          // As read at the instrument: the step's own size, within a tenth.
          const raw = near.reflectionCoefficientRaw ?? near.reflectionCoefficient;
          expect(Math.abs(raw - small)).toBeLessThan(0.003);
        }
  });
});
