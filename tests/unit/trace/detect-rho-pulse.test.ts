import { describe, expect, it } from 'vitest';
import { analyzeTrace } from '../../../shared/trace';
import { gaussianSource } from '../../../scripts/sim/line-model';
import { gaussianShapes, parsedTrace } from '../../support/parsed-trace';

const DT = 1e-10;
/** A ρ-unit export: time zero at the launch's half height, sample 1000. */
const parsed = (y: Float64Array) => parsedTrace(y, { timeS: new Float64Array(y.length).map((_, i) => (i - 1000) * DT), unit: 'rho' });

/** Gaussian-edged pulse (10–90 % rise in 150 samples) from sample a, w samples wide at half height. */
const { pulse } = gaussianShapes(150);

describe('a ρ-unit pulse record sampled finely', () => {
  it('follows the launch pulse to its top (+1), so the record is read as a pulse record', () => {
    // The launch rises by under 1 % of its height per sample: no single sample climbs 2 % above
    // the last, yet the edge climbs all the way to +1.
    const rnd = gaussianSource(43);
    const y = new Float64Array(12000).map((_, i) => pulse(i, 1000, 1200) + 0.5 * pulse(i, 5000, 1200) + 0.002 * rnd());
    const a = analyzeTrace(parsed(y), { vf: 0.8 });
    expect(a.mode).toBe('pulse');
    expect(Math.abs(a.incidentLevel - 1)).toBeLessThan(0.05);
    // The echo, 4000 samples (400 ns) after the launch: d = 0.8 × 0.29979 m/ns × 400 ns / 2 = 47.97 m.
    expect(a.events).toHaveLength(1);
    expect(Math.abs(a.events[0].distanceM - 47.97)).toBeLessThan(0.5);
    expect(Math.abs(a.events[0].reflectionCoefficientRaw! - 0.5)).toBeLessThan(0.1);
  });
});
