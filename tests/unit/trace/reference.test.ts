import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { analyzeCsv } from '../../../shared/trace';

// Traces made by scikit-rf (scripts/make-reference-traces.py): S11 step
// responses of coaxial lines of known length, VF = 1/√εr, and known loads.
// The check values (length, ρ of the load) are the generator's inputs.
const dir = join(__dirname, '../../fixtures/traces/reference');
const manifest = JSON.parse(readFileSync(join(dir, 'manifest.json'), 'utf8')) as Array<{
  file: string;
  vf: number;
  z0_ohm: number;
  length_m: number;
  events: Array<{ distance_m: number; type: string; reflection_coefficient: number }>;
}>;

describe('scikit-rf reference traces', () => {
  it('has traces for open, short, resistive loads and a matched line', () => {
    expect(manifest.length).toBeGreaterThanOrEqual(5);
    expect(manifest.some((m) => m.events.length === 0)).toBe(true);
  });

  for (const ref of manifest) {
    it(`finds ${ref.events.map((e) => `${e.type} at ${e.distance_m} m`).join(', ') || 'nothing'} in ${ref.file}`, () => {
      const a = analyzeCsv(readFileSync(join(dir, ref.file), 'utf8'), {}, { vf: ref.vf, z0Ohm: ref.z0_ohm });
      expect(a.amplitudeUnit).toBe('rho');
      expect(a.events.length).toBe(ref.events.length);
      ref.events.forEach((exp, k) => {
        const got = a.events[k];
        expect(Math.abs(got.distanceM - exp.distance_m)).toBeLessThanOrEqual(Math.max(0.1, 0.01 * exp.distance_m));
        expect(got.type).toBe(exp.type);
        expect(got.windowStartM).toBeLessThanOrEqual(exp.distance_m);
        expect(got.windowEndM).toBeGreaterThanOrEqual(exp.distance_m);
        if (!ref.file.includes('lossy')) expect(got.reflectionCoefficient).toBeCloseTo(exp.reflection_coefficient, 1);
      });
      if (ref.events.length === 0) expect(a.warnings.map((w) => w.code)).toContain('NO_REFLECTION');
    });
  }
});
