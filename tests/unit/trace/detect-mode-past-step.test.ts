import { describe, expect, it } from 'vitest';
import { analyzeTrace } from '../../../shared/trace';
import { gaussianSource } from '../../../scripts/sim/line-model';
import { gaussianShapes, parsedTrace } from '../../support/parsed-trace';

/**
 * A step record on a 50 Ω line that changes, 200 samples out, to a 4.05 Ω section (ρ = (4.05 − 50) /
 * (4.05 + 50) = −0.85) ending in an open 210 samples further. A change of line passes 1 + ρ out and
 * 1 − ρ back, so the open shows at (1 − ρ²) = 0.2775 of the launch (Pozar §2.3, eq. 2.35 for each
 * junction); only a lumped shunt fault passes (1 + ρ)² = (1 − |ρ|)² = 0.0225. The record ends before
 * the section's next round trip, and the open is no whole multiple of the change's round trip. The check values are the generator's inputs; distance from round
 * trip: d = VF·c·t/2 with t in samples of 2 ns at VF 0.66.
 */
function record(): Float64Array {
  const n = 660;
  const { edge } = gaussianShapes(6);
  const rnd = gaussianSource(11);
  const rho = -0.85;
  return new Float64Array(n).map(
    (_, i) => edge(i - 100) + rho * edge(i - 260) + (1 - rho * rho) * edge(i - 470) + 0.004 * rnd(),
  );
}

describe('a step record past a change to a much lower impedance', () => {
  it('stays a step record and reports the open beyond the change', () => {
    const a = analyzeTrace(parsedTrace(record(), { dtS: 2e-9, t0S: -100 * 2e-9 }), { vf: 0.66, z0Ohm: 50 });
    expect(a.mode).toBe('step');
    expect(a.warnings.map((w) => w.code)).not.toContain('MODE_FROM_ECHOES');
    const real = a.events.filter((e) => e.likelyMultipleOf === null);
    // 160 samples of 2 ns: 0.66 · 299792458 · 320e-9 / 2 = 31.66 m; 370 samples: 73.20 m.
    expect(real.map((e) => e.type)).toEqual(['impedance-drop', 'open']);
    expect(Math.abs(real[0].distanceM - 31.66)).toBeLessThan(0.5);
    expect(real[0].reflectionCoefficient).toBeCloseTo(-0.85, 1);
    expect(Math.abs(real[1].distanceM - 73.2)).toBeLessThan(0.8);
  });
});
