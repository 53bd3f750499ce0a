import { describe, expect, it } from 'vitest';
import { analyzeTrace } from '../../../shared/trace';
import { restingDrift } from '../../../shared/trace/signal';
import { gaussianSource } from '../../../scripts/sim/line-model';
import { gaussianShapes, parsedTrace } from '../../support/parsed-trace';

describe('the baseline of a pulse record whose echoes fill most of it, after a pre-trigger stretch', () => {
  // A short line read with a wide pulse: the launch 220 samples wide (rising in 20) at sample 300,
  // after 300 samples of pre-trigger, and four echoes of it at 400, 800, 1050 and 1250 samples of
  // round trip (ρ +0.05, +0.12, +0.10, −0.45); the record ends 1900 samples in, so the echoes fill
  // most of the record after the launch and the median of each half sits on one of them.
  const N = 1900;
  const W = 220;
  const L0 = 300;
  const { pulse } = gaussianShapes(20);
  const rnd = gaussianSource(3);
  const echoes: Array<[number, number]> = [
    [400, 0.05],
    [800, 0.12],
    [1050, 0.1],
    [1250, -0.45],
  ];
  const y = new Float64Array(N).map(
    (_, i) => pulse(i, L0, W) + echoes.reduce((s, [rt, r]) => s + r * pulse(i, L0 + rt, W), 0) + 0.002 * rnd(),
  );

  it('is the level the record starts from, so the first, small echo is reported and no false drop', () => {
    const a = analyzeTrace(parsedTrace(y, { dtS: 1e-10 }), { vf: 0.8 });
    expect(a.mode).toBe('pulse');
    // d = VF·c·t/2 = 0.8 × 0.2998 m/ns × 40 ns / 2 = 4.80 m.
    const first = a.events.filter((e) => Math.abs(e.distanceM - 4.8) < 0.15);
    expect(first).toHaveLength(1);
    expect(first[0].reflectionCoefficient).toBeGreaterThan(0.04);
    expect(first[0].reflectionCoefficient).toBeLessThan(0.065);
    // Nothing falls before the short-like drop at 0.8 × 0.2998 × 125 / 2 = 14.99 m.
    expect(a.events.filter((e) => e.distanceM < 14 && e.reflectionCoefficient < 0)).toHaveLength(0);
  });

  it('finds the drift the most samples rest on, not the median of what the echoes fill', () => {
    // A drift of 4 % of the launch over the record (within the bound of a tenth), on the same record.
    const z = y.map((v, i) => v + (0.04 * i) / (N - 1));
    // Anchored at the pre-trigger's middle (sample 150), where the drift has reached 0.04 × 150 / 1899.
    const s = restingDrift(z, 600, { level: (0.04 * 150) / (N - 1), at: 150 }, 0.006, 0.1 / (N - 1));
    expect(Math.abs(s - 0.04 / (N - 1))).toBeLessThan(0.002 / (N - 1));
  });
});
