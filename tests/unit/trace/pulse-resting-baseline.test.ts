import { describe, expect, it } from 'vitest';
import { analyzeTrace } from '../../../shared/trace';
import { gaussianSource } from '../../../scripts/sim/line-model';
import { gaussianShapes, parsedTrace } from '../../support/parsed-trace';

describe('the baseline of a pulse record whose echo fills its second half', () => {
  // A short cable read with a wide pulse: the launch (400 samples wide, rising in 30) at
  // sample 100 and an open's echo of 0.8 of it at 1300 samples of round trip; the record ends
  // 2000 samples in, so the echo fills most of the record's second half and the median of
  // that half is the echo's top, not the baseline.
  const N = 2000;
  const W = 400;
  const RT = 1300;
  const { pulse } = gaussianShapes(30);
  const rnd = gaussianSource(5);
  const y = new Float64Array(N).map((_, i) => pulse(i, 100, W) + 0.8 * pulse(i, 100 + RT, W) + 0.002 * rnd());

  it('is drawn through where the record rests, so the open reads as one positive echo', () => {
    const a = analyzeTrace(parsedTrace(y, { dtS: 1e-10 }), { vf: 0.66 });
    expect(a.mode).toBe('pulse');
    // d = VF·c·t/2 = 0.66 × 0.2998 m/ns × 130 ns / 2 = 12.86 m.
    expect(a.events).toHaveLength(1);
    expect(Math.abs(a.events[0].distanceM - 12.86)).toBeLessThan(0.15);
    expect(a.events[0].type).toBe('open');
    expect(a.events[0].reflectionCoefficient).toBeGreaterThan(0.7);
    expect(a.events[0].reflectionCoefficient).toBeLessThan(0.9);
  });

  it('still follows a real drift when both halves rest', () => {
    // The same launch and echo in a record twice as long, with a drift of 2 % of the launch over it.
    const M = 4000;
    const z = new Float64Array(M).map((_, i) => pulse(i, 100, W) + 0.8 * pulse(i, 100 + RT, W) + (0.02 * i) / M + 0.002 * rnd());
    const a = analyzeTrace(parsedTrace(z, { dtS: 1e-10 }), { vf: 0.66 });
    expect(a.events).toHaveLength(1);
    expect(a.events[0].type).toBe('open');
  });
});
