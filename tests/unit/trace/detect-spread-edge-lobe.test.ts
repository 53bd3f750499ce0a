import { describe, expect, it } from 'vitest';
import { analyzeTrace } from '../../../shared/trace';
import { gaussianSource } from '../../../scripts/sim/line-model';
import { erf, parsedTrace } from '../../support/parsed-trace';

const N = 16000;
/** Skin-effect spread of the edge, samples (the step response erfc(√(τ/t)) of a lossy line; common practice). */
const TAU = 800;

/**
 * A step record (1 ns samples) of a leaky line: the launch to 1 V at sample 200, its level sagging by a fifth
 * over the record (shunt leakage), and a rise of 0.2 at sample 6000 spread by skin-effect loss,
 * 0.2·erfc(√(τ/t)): it rises within about τ and creeps on for many times that. White noise of 0.002.
 */
function record(seed: number): Float64Array {
  const rnd = gaussianSource(seed);
  return new Float64Array(N).map((_, i) => {
    const t = i - 6000;
    const edge = t > 0 ? 0.2 * (1 - erf(Math.sqrt(TAU / t))) : 0;
    return (i >= 200 ? 1 - (0.2 * (i - 200)) / N : 0) + edge + 0.002 * rnd();
  });
}

describe('a loss-spread rise on a sagging line', () => {
  it('is one rising event, not also a drop where the step filter’s leading lobe falls', () => {
    // The filter answers a step with −½ of it one window to either side. An edge that rises fast and creeps
    // on loses more of its own response than of the lobe ahead of it, which then stands at more than 1/1.6
    // of the response, and the sag hides that the level rises across the lobe. The level moves up across the
    // lobe and the edge together by more than the edge's response, which a real drop there would lessen.
    for (const seed of [1, 2]) {
      const a = analyzeTrace(parsedTrace(record(seed)), { vf: 0.66 });
      expect(a.mode).toBe('step');
      expect(a.events).toHaveLength(1);
      expect(a.events[0].type).toBe('impedance-rise');
      // The rise starts 5800 ns after the launch: d = 0.66 × 0.2998 m/ns × 5800 ns / 2 = 573.8 m; its slow
      // rise puts the reading later, within a sixth of the distance.
      expect(a.events[0].distanceM).toBeGreaterThan(565);
      expect(a.events[0].distanceM).toBeLessThan(670);
    }
  });
});
