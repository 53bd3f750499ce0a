import { describe, expect, it } from 'vitest';
import { analyzeTrace } from '../../../shared/trace';
import { gaussianSource } from '../../../scripts/sim/line-model';
import { gaussianShapes, parsedTrace } from '../../support/parsed-trace';

describe('the filter noise of a short pulse record full of echoes', () => {
  // A short line read with a narrow pulse at a coarse sample interval (25 ns): the launch 13 samples
  // wide (rising in 3) at sample 80 and five echoes of it at 38, 70, 124, 158 and 230 samples of round
  // trip (ρ +0.08, −0.22, −0.12, −0.30, +0.10), in a record of 480 samples; white noise σ = 0.004 of
  // the launch. At the finest scales most of the filter's differences four windows apart hold an echo,
  // so their plain MAD reads the echoes as noise several times the real one.
  const N = 480;
  const W = 13;
  const L0 = 80;
  const { pulse } = gaussianShapes(3);
  const rnd = gaussianSource(4);
  const echoes: Array<[number, number]> = [
    [38, 0.08],
    [70, -0.22],
    [124, -0.12],
    [158, -0.3],
    [230, 0.1],
  ];
  const y = new Float64Array(N).map(
    (_, i) => pulse(i, L0, W) + echoes.reduce((s, [rt, r]) => s + r * pulse(i, L0 + rt, W), 0) + 0.004 * rnd(),
  );

  it('reports every echo, each at its distance and with its size', () => {
    const a = analyzeTrace(parsedTrace(y, { dtS: 25e-9 }), { vf: 0.53 });
    expect(a.mode).toBe('pulse');
    expect(a.events).toHaveLength(echoes.length);
    for (const [k, [rt, r]] of echoes.entries()) {
      // d = VF·c·t/2, e.g. 0.53 × 0.2998 m/ns × (38 × 25 ns) / 2 = 75.47 m.
      const d = (0.53 * 0.299792458 * rt * 25) / 2;
      expect(Math.abs(a.events[k].distanceM - d)).toBeLessThan(1.5);
      const raw = a.events[k].reflectionCoefficientRaw ?? a.events[k].reflectionCoefficient;
      expect(Math.abs(raw - r)).toBeLessThan(0.02);
    }
  });
});
