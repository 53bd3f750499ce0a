import { describe, expect, it } from 'vitest';
import { analyzeTrace } from '../../../shared/trace';
import { gaussianSource } from '../../../scripts/sim/line-model';
import { gaussianShapes, parsedTrace } from '../../support/parsed-trace';

describe('a weak echo a little before a short section, in a pulse record', () => {
  // A launch pulse 64 samples wide (rising in 11) at sample 100, sampled every 0.25 ns; a shunt
  // of ρ = −0.025 at 300 samples of round trip, a splice of ±0.15 from 456 to 500, and a ρ 0.3
  // end at 800; white noise of 0.005 of the launch. An echo's ramp in the running sum is the
  // pulse's width, 2.5 of the finest windows (0.4 of the width): there the filter reads a fifth
  // of the shunt's ρ, and three times coarser its windows reach the splice.
  const N = 1500;
  const W = 64;
  const { pulse } = gaussianShapes(11);
  const trace = (seed: number) => {
    const rnd = gaussianSource(seed);
    const y = new Float64Array(N).map(
      (_, i) =>
        pulse(i, 100, W) -
        0.025 * pulse(i, 400, W) +
        0.15 * pulse(i, 556, W) -
        0.15 * pulse(i, 600, W) +
        0.3 * pulse(i, 900, W) +
        0.005 * rnd(),
    );
    return analyzeTrace(parsedTrace(y, { dtS: 2.5e-10 }), { vf: 0.64 });
  };
  // d = VF·c·t/2 = 0.64 × 0.2998 m/ns × 75 ns / 2 = 7.19 m (and 10.94, 11.99, 19.19 m).
  const expected = [7.19, 10.94, 11.99, 19.19];

  it('is found at the scale of the echo ramp, twice the finest window', () => {
    let found = 0;
    for (let seed = 1; seed <= 10; seed++) {
      const a = trace(seed);
      const shunt = a.events.filter((e) => Math.abs(e.distanceM - 7.19) < 0.3);
      if (shunt.length === 1 && shunt[0].reflectionCoefficient < 0) found++;
    }
    expect(found).toBeGreaterThanOrEqual(8);
  });

  it('adds nothing away from the echoes', () => {
    for (let seed = 1; seed <= 10; seed++) {
      const stray = trace(seed).events.filter((e) => expected.every((d) => Math.abs(e.distanceM - d) > 0.6));
      expect(stray).toHaveLength(0);
    }
  });
});
