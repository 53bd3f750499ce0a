import { describe, expect, it } from 'vitest';
import { analyzeTrace } from '../../../shared/trace';
import { noiseExcess } from '../../../shared/trace/noise';
import { gaussianSource } from '../../../scripts/sim/line-model';
import { gaussianShapes, parsedTrace } from '../../support/parsed-trace';

describe('the noise measure of a pulse record its echoes fill end to end', () => {
  // A short line read with a wide pulse: the launch 100 samples wide (rising in 25) at sample 150 and
  // eight echoes of it, 100 to 230 samples apart, to the end of a 1230-sample record; white noise
  // σ = 0.0015 of the launch. At blocks of 16 samples nearly every second difference holds a pulse's
  // edge, more than even the clipped spread can see past.
  const N = 1230;
  const W = 100;
  const { pulse } = gaussianShapes(25);
  const rnd = gaussianSource(2);
  const echoes: Array<[number, number]> = [
    [200, 0.09],
    [330, 0.3],
    [430, 0.95],
    [560, -0.3],
    [700, 0.5],
    [830, -0.2],
    [960, 0.4],
    [1060, -0.15],
  ];
  const y = new Float64Array(N).map(
    (_, i) => pulse(i, 150, W) + echoes.reduce((s, [rt, r]) => s + r * pulse(i, 150 + rt, W), 0) + 0.0015 * rnd(),
  );

  it('rises from one block size to the next no faster than noise as slow as a random walk can', () => {
    const ex = noiseExcess(y, 0.0015, undefined, null, 2 * W);
    // A random walk's block-mean second differences grow as √b against white noise's 1/√b: the
    // factor at most doubles when the block doubles (from memory, by the variance of summed steps).
    for (const b of [2, 4, 8, 16]) expect(ex(b)).toBeLessThanOrEqual(2 * ex(b / 2) + 1e-12);
    expect(ex(16)).toBeLessThan(4);
  });

  it('so the first, small echo near the launch is reported', () => {
    const a = analyzeTrace(parsedTrace(y, { dtS: 1e-10 }), { vf: 0.62 });
    expect(a.mode).toBe('pulse');
    // d = VF·c·t/2 = 0.62 × 0.2998 m/ns × 20 ns / 2 = 1.86 m.
    const first = a.events.filter((e) => Math.abs(e.distanceM - 1.86) < 0.1);
    expect(first).toHaveLength(1);
    expect(first[0].reflectionCoefficient).toBeGreaterThan(0.07);
    expect(first[0].reflectionCoefficient).toBeLessThan(0.11);
  });
});
