import { describe, expect, it } from 'vitest';
import { analyzeTrace } from '../../../shared/trace';
import { findLaunch } from '../../../shared/trace/launch';
import { estimateSlowNoise } from '../../../shared/trace/noise';
import type { TraceRecord } from '../../../shared/trace/steps';
import { gaussianSource } from '../../../scripts/sim/line-model';
import { gaussianShapes, parsedTrace } from '../../support/parsed-trace';

// A noisy pulse record in volts that starts during its launch (the axis starts at 0 with the record):
// 3000 samples of 2 ns, an 11 V pulse 10 samples wide at half height, rising and falling in 4, whose
// rising half-height point is 2 samples before the record; the line idles at −2.7 V, with noise of
// σ = 1.5 V. The search for the launch averages such a record over several samples, which draws the
// launch's fall out beyond the few samples the record holds of its top. Nothing returns.
const N = 3000;
const DT = 2e-9;
const WIDTH = 10;
const { pulse } = gaussianShapes(4);

function noisyRecord(seed: number): TraceRecord {
  const rnd = gaussianSource(seed);
  const y = new Float64Array(N).map((_, i) => -2.7 + 11 * pulse(i, -2, WIDTH) + 1.5 * rnd());
  return { y, t: new Float64Array(N).map((_, i) => i * DT), n: N, dt: DT, unit: 'V' };
}

describe('a noisy pulse record that starts during its launch', () => {
  it('is found as a launch before the record, its fall taken as the averaging leaves it', () => {
    let found = 0;
    for (let seed = 1; seed <= 10; seed++) {
      const rec = noisyRecord(seed);
      const L = findLaunch(rec, 'auto', null, estimateSlowNoise(rec.y));
      if (L.mode === 'pulse' && !L.onsetInRecord && Math.abs(L.baseline + 2.7) < 0.3) found++;
    }
    expect(found).toBeGreaterThanOrEqual(9);
  });

  it('reports no short where the launch falls', () => {
    const rec = noisyRecord(4);
    const a = analyzeTrace(parsedTrace(rec.y, { timeS: rec.t }), { vf: 0.83 });
    expect(a.mode).toBe('pulse');
    expect(a.events.some((e) => e.type === 'short')).toBe(false);
  });
});
