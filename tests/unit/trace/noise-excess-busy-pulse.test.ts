import { describe, expect, it } from 'vitest';
import { analyzeTrace } from '../../../shared/trace';
import { noiseExcess } from '../../../shared/trace/noise';
import { gaussianSource } from '../../../scripts/sim/line-model';
import { gaussianShapes, parsedTrace } from '../../support/parsed-trace';

describe('the noise measure of a pulse record that is mostly launch and echoes', () => {
  // A short line read with a wide pulse, in ρ: the launch 850 samples wide (rising in 100) at
  // sample 200 and six echoes of it, so at block sizes near the pulse's width most of the
  // record's second differences hold a pulse's shape; the noise is white, σ = 0.001.
  const N = 13000;
  const W = 850;
  const { pulse } = gaussianShapes(100);
  const echoes: Array<[number, number]> = [
    [1600, -0.22],
    [5900, 0.2],
    [7300, 0.5],
    [9000, -0.1],
    [10600, 0.08],
    [12000, 0.05],
  ];
  const rnd = gaussianSource(9);
  const y = new Float64Array(N).map(
    (_, i) => pulse(i, 200, W) + echoes.reduce((s, [rt, r]) => s + r * pulse(i, 200 + rt, W), 0) + 0.001 * rnd(),
  );

  it('finds white noise white up to twice the pulse width', () => {
    const clipped = noiseExcess(y, 0.001, undefined, null, 2 * W);
    const plain = noiseExcess(y, 0.001);
    // The plain spread reads the pulses' shapes as noise many times the white level.
    expect(plain(256)).toBeGreaterThan(10);
    for (const b of [64, 128, 256]) expect(clipped(b)).toBeLessThan(1.5);
  });

  it('so the first echo, a drop of 0.22, is reported', () => {
    const a = analyzeTrace(parsedTrace(y, { dtS: 4e-11, unit: 'rho' }), { vf: 0.67 });
    // d = VF·c·t/2 = 0.67 × 0.2998 m/ns × 64 ns / 2 = 6.43 m.
    const drop = a.events.filter((e) => Math.abs(e.distanceM - 6.43) < 0.2);
    expect(drop).toHaveLength(1);
    expect(drop[0].reflectionCoefficient).toBeGreaterThan(-0.25);
    expect(drop[0].reflectionCoefficient).toBeLessThan(-0.19);
  });
});
