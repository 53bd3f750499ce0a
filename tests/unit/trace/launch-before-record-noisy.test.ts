import { describe, expect, it } from 'vitest';
import { analyzeTrace } from '../../../shared/trace';
import { findLaunch } from '../../../shared/trace/launch';
import { estimateSlowNoise } from '../../../shared/trace/noise';
import type { TraceRecord } from '../../../shared/trace/steps';
import { gaussianSource } from '../../../scripts/sim/line-model';
import { gaussianShapes, parsedTrace } from '../../support/parsed-trace';

// A noisy pulse record in volts that starts during its launch (the axis starts at 0 with the record):
// 5000 samples of 0.25 ns, a 1.6 V pulse 270 samples wide at half height, rising in 20, whose rising
// half-height point is 15 samples before the record; the line idles at −0.2 V; a short returns −1.5 V
// 2515 samples of round trip later; white noise of σ = 0.4 V, a quarter of the launch.
const N = 5000;
const DT = 2.5e-10;
const { pulse } = gaussianShapes(20);

function noisyRecord(seed: number): TraceRecord {
  const rnd = gaussianSource(seed);
  const y = new Float64Array(N).map((_, i) => -0.2 + 1.6 * pulse(i, -15, 270) - 1.5 * pulse(i, 2500, 270) + 0.4 * rnd());
  return { y, t: new Float64Array(N).map((_, i) => i * DT), n: N, dt: DT, unit: 'V' };
}

describe('a noisy pulse record that starts during its launch', () => {
  it('is found as a launch before the record against the noise of the record it is read from', () => {
    // The search averages the record over several samples; held against five deviations of the noise
    // before that, the launch's top fell short of the smallest excursion taken as a launch.
    let found = 0;
    for (let seed = 1; seed <= 10; seed++) {
      const rec = noisyRecord(seed);
      const L = findLaunch(rec, 'auto', null, estimateSlowNoise(rec.y));
      if (L.mode === 'pulse' && !L.onsetInRecord && Math.abs(L.baseline + 0.2) < 0.1) found++;
    }
    expect(found).toBeGreaterThanOrEqual(9);
  });

  it('places the short against that launch', () => {
    const rec = noisyRecord(3);
    const a = analyzeTrace(parsedTrace(rec.y, { timeS: rec.t }), { vf: 0.58 });
    expect(a.mode).toBe('pulse');
    // d = VF·c·t/2 = 0.58 × 0.2998 m/ns × 628.75 ns / 2 = 54.7 m.
    const end = a.events.filter((e) => Math.abs(e.distanceM - 54.7) < 1);
    expect(end).toHaveLength(1);
    expect(end[0].reflectionCoefficient).toBeLessThan(-0.8);
  });
});
