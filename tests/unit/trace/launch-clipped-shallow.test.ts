import { describe, expect, it } from 'vitest';
import { analyzeTrace } from '../../../shared/trace';
import { gaussianSource } from '../../../scripts/sim/line-model';
import { gaussianShapes, parsedTrace } from '../../support/parsed-trace';

/**
 * A 1 V step launch into a line whose open end doubles it, recorded by a recorder that tops out at
 * 0.98 V: the launch's edge has all but finished when it meets the limit (its slope there is under a
 * tenth of its steepest), so the limit shows only as a run of equal samples at the record's top while
 * the noise (σ 10 mV, unquantised) moves every other sample. The check values are the generator's
 * inputs.
 */
function record(limitV: number): Float64Array {
  const { edge } = gaussianShapes(8);
  const rnd = gaussianSource(21);
  return new Float64Array(900).map((_, i) => Math.min(limitV, edge(i - 100) + 0.3 * edge(i - 600) + 0.01 * rnd()));
}

describe('a launch that only just reaches the recorder’s limit', () => {
  it('is flagged as clipped', () => {
    const a = analyzeTrace(parsedTrace(record(0.98), { dtS: 1e-9, t0S: -100e-9 }), { vf: 0.66 });
    expect(a.warnings.map((w) => w.code)).toContain('LAUNCH_CLIPPED');
  });

  it('is not flagged where the recorder had room', () => {
    const a = analyzeTrace(parsedTrace(record(5), { dtS: 1e-9, t0S: -100e-9 }), { vf: 0.66 });
    expect(a.warnings.map((w) => w.code)).not.toContain('LAUNCH_CLIPPED');
    // The rise at 500 samples of 1 ns: d = 0.66 · 0.29979 m/ns · 500 ns / 2 = 49.47 m, ρ +0.3.
    expect(a.events).toHaveLength(1);
    expect(Math.abs(a.events[0].distanceM - 49.47)).toBeLessThan(0.5);
    expect(a.events[0].reflectionCoefficient).toBeCloseTo(0.3, 1);
  });
});
