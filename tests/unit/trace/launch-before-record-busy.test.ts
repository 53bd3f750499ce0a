import { describe, expect, it } from 'vitest';
import { analyzeTrace } from '../../../shared/trace';
import { findLaunch } from '../../../shared/trace/launch';
import { estimateSlowNoise } from '../../../shared/trace/noise';
import type { TraceRecord } from '../../../shared/trace/steps';
import { gaussianSource } from '../../../scripts/sim/line-model';
import { gaussianShapes, parsedTrace } from '../../support/parsed-trace';

describe('a pulse record that starts during its launch and is mostly echoes after it', () => {
  // A short line read with a wide pulse (600 samples, rising in 30, 4 V) and no pre-trigger:
  // the record opens in the launch's middle, on a -0.6 V offset, and two echoes of ±0.5 of the
  // launch (at 1300 and 2100 samples of round trip) fill over 40 % of what follows it, so less
  // than 60 % of the record rests near its level; its median still sits there.
  const N = 3000;
  const W = 600;
  const { pulse } = gaussianShapes(30);
  const rnd = gaussianSource(7);
  const y = new Float64Array(N).map(
    (_, i) => 4 * (pulse(i, -300, W) + 0.5 * pulse(i, 1000, W) - 0.5 * pulse(i, 1800, W)) - 0.6 + 0.01 * rnd(),
  );

  it('is read as a pulse record whose launch began before it', () => {
    const rec: TraceRecord = { y, t: new Float64Array(N).map((_, i) => i * 1e-10), n: N, dt: 1e-10, unit: 'V' };
    const L = findLaunch(rec, 'auto', W, estimateSlowNoise(y));
    expect(L.found).toBe(true);
    expect(L.onsetInRecord).toBe(false);
    expect(L.mode).toBe('pulse');
    expect(Math.abs(L.baseline + 0.6)).toBeLessThan(0.05);
    expect(Math.abs(L.height - 4)).toBeLessThan(0.2);
  });

  it('reports the two echoes with their signs', () => {
    const a = analyzeTrace(parsedTrace(y, { dtS: 1e-10 }), { vf: 0.66, pulseWidthNs: 60 });
    expect(a.mode).toBe('pulse');
    // Round trips from the launch's start (300 samples before the record): 1300 and 2100
    // samples of 0.1 ns, d = VF·c·t/2 = 0.66 × 0.2998 m/ns × 130 ns / 2 = 12.86 m and 20.78 m;
    // the axis zero is the record's start, so they read 300 samples (2.97 m) nearer.
    const first = a.events.find((e) => Math.abs(e.distanceM - 9.89) < 0.5);
    const second = a.events.find((e) => Math.abs(e.distanceM - 17.81) < 0.5);
    expect(first?.reflectionCoefficient).toBeGreaterThan(0.3);
    expect(second?.reflectionCoefficient).toBeLessThan(-0.3);
  });
});
