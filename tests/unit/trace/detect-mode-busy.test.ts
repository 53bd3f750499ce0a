import { describe, expect, it } from 'vitest';
import { analyzeTrace } from '../../../shared/trace';
import { gaussianSource } from '../../../scripts/sim/line-model';
import { gaussianShapes, parsedTrace } from '../../support/parsed-trace';

const DT = 1e-9;
const parsed = (y: Float64Array) => parsedTrace(y, { dtS: DT });

/** A pulse from sample a, w samples wide at half height, Gaussian-edged (10–90 % in 20 samples). */
const { pulse } = gaussianShapes(20);

describe('a pulse record whose echoes fill much of it', () => {
  it('is read as a pulse record when its median after the launch sits on the baseline', () => {
    // A 1500-sample launch pulse and four echoes of alternating sign (a line bouncing between a
    // mismatched source and an open end, with little loss), covering 6000 of the 8900 samples after
    // the launch: under 60 % of the record rests at the baseline, yet its median does.
    const W = 1500;
    const echoes: Array<[number, number]> = [
      [3100, 0.6],
      [4700, -0.5],
      [6300, 0.35],
      [7900, -0.25],
    ];
    const rnd = gaussianSource(41);
    const y = new Float64Array(12000).map(
      (_, i) => pulse(i, 100, W) + echoes.reduce((s, [a, h]) => s + h * pulse(i, a, W), 0) + 0.002 * rnd(),
    );
    const a = analyzeTrace(parsed(y), { vf: 0.8 });
    expect(a.mode).toBe('pulse');
    expect(Math.abs((a.pulseWidthNs ?? 0) - W)).toBeLessThan(20);
    // The first echo, 3000 samples after the launch: d = 0.8 × 0.29979 m/ns × 3000 ns / 2 = 359.7 m.
    expect(a.events.length).toBeGreaterThanOrEqual(1);
    expect(Math.abs(a.events[0].distanceM - 359.7)).toBeLessThan(3.6);
    expect(a.events[0].reflectionCoefficientRaw).toBeGreaterThan(0);
  });
});
