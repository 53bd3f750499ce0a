import { describe, expect, it } from 'vitest';
import { analyzeTrace } from '../../../shared/trace';
import { gaussianSource } from '../../../scripts/sim/line-model';
import { gaussianShapes, parsedTrace } from '../../support/parsed-trace';

describe('an echo a pulse and a half before a larger one, in a wide-pulse record', () => {
  // A flat-topped launch pulse 200 samples wide (rising in 20) at sample 100, sampled every
  // 0.1 ns; a ρ 0.2 echo (a wet section's end) 900 samples later and a ρ 0.5 one (the cable's
  // end) 300 samples after that, 1.5 pulse widths; white noise of 0.002 of the launch. In the
  // running sum each echo is a ramp as long as the pulse, 2.5 of the finest windows, where the
  // filter reads the first at a fraction of its ρ, beside a side lobe of the other sign more
  // than 1.6 times that; the level across it still climbs by its ρ.
  const N = 2600;
  const W = 200;
  const { pulse } = gaussianShapes(20);
  const trace = (seed: number) => {
    const rnd = gaussianSource(seed);
    const y = new Float64Array(N).map(
      (_, i) => pulse(i, 100, W) + 0.2 * pulse(i, 1000, W) + 0.5 * pulse(i, 1300, W) + 0.002 * rnd(),
    );
    return analyzeTrace(parsedTrace(y, { dtS: 1e-10 }), { vf: 0.66 });
  };
  // d = VF·c·t/2 = 0.66 × 0.29979 m/ns × 90 ns / 2 = 8.90 m, and 120 ns: 11.87 m.
  const expected = [8.9, 11.87];

  it('is reported, rising, beside the larger echo', () => {
    for (let seed = 1; seed <= 5; seed++) {
      const a = trace(seed);
      const first = a.events.filter((e) => Math.abs(e.distanceM - 8.9) < 0.4);
      expect(first).toHaveLength(1);
      expect(first[0].reflectionCoefficient).toBeGreaterThan(0.1);
      expect(a.events.filter((e) => Math.abs(e.distanceM - 11.87) < 0.4)).toHaveLength(1);
    }
  });

  it('adds nothing away from the echoes', () => {
    for (let seed = 1; seed <= 5; seed++) {
      const stray = trace(seed).events.filter((e) => expected.every((d) => Math.abs(e.distanceM - d) > 0.6));
      expect(stray).toHaveLength(0);
    }
  });
});
