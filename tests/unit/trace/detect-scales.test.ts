import { describe, expect, it } from 'vitest';
import { analyzeTrace } from '../../../shared/trace';
import { parsedTrace } from '../../support/parsed-trace';
import { gaussianSource } from '../../../scripts/sim/line-model';

const DT = 1e-9;
const parsed = (y: Float64Array) => parsedTrace(y, { dtS: DT });

describe('the step filter’s scales', () => {
  it('reach a smooth far edge spread over thousands of samples, however fine the finest scale is', () => {
    // A step record that begins after its launch, at the incident level of 2 V, so the finest
    // scale is 2 samples. A rise of ρ = 0.1 with a raised-cosine shape over 16 000 samples
    // (no sharp corner anywhere), from sample 60 000 of 160 000; noise σ = 0.02 V (1 % of the
    // incident level). Only a scale of thousands of samples holds it: 2·3⁶ = 1458 is not enough.
    const rnd = gaussianSource(31);
    const y = new Float64Array(160_000).map((_, i) => {
      const x = Math.min(1, Math.max(0, (i - 60_000) / 16_000));
      return 2 * (1 + 0.05 * (1 - Math.cos(Math.PI * x))) + 0.02 * rnd();
    });
    const a = analyzeTrace(parsed(y), { vf: 0.66 });
    expect(a.mode).toBe('step');
    expect(a.events).toHaveLength(1);
    expect(a.events[0].type).toBe('impedance-rise');
    // The edge spans 60 000–76 000 ns of round trip: d = 0.66 × 0.2998 m/ns × t/2 = 5936–7519 m.
    expect(a.events[0].distanceM).toBeGreaterThan(5900);
    expect(a.events[0].distanceM).toBeLessThan(7550);
  });
});
