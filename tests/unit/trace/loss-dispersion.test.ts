import { describe, expect, it } from 'vitest';
import { dielectricSpread, lineKernel } from '../../../shared/trace/loss';

/**
 * The causal dielectric spread: a loss rising as f, |H| = exp(−c·|ω|), has the phase
 * φ(ω) = (2c/π)·ω·ln(ω/ω_ref) (its Hilbert transform; W. I. Futterman, J. Geophys. Res. 67 (1962)
 * 5279), so every frequency under ω_ref arrives later than at the speed given. Checked here on the
 * kernel itself: its spectrum, its causality, and the delay of a frequency against the formula.
 */
describe('the causal dielectric spread', () => {
  const model = { skinNpPerMRootHz: 0, dielectricNpPerMPerHz: 2e-10 };
  const twoWayM = 600;
  const dt = 2e-9;
  const refHz = 1 / (2 * dt);
  const c = dielectricSpread(model, twoWayM); // 600·2e-10/2π = 19.1 ns

  /** The kernel's transform at angular frequency w, taken about its delay (sample `offset`). */
  function spectrumAt(k: { values: Float64Array; offset: number }, w: number): { mag: number; phase: number } {
    let re = 0;
    let im = 0;
    for (let i = 0; i < k.values.length; i++) {
      const t = (i - k.offset) * dt;
      re += k.values[i] * Math.cos(w * t);
      im -= k.values[i] * Math.sin(w * t);
    }
    return { mag: Math.hypot(re, im), phase: Math.atan2(im, re) };
  }

  it('keeps the magnitude of the zero-phase spread and adds the phase a causal loss has', () => {
    const k = lineKernel(model, twoWayM, dt, 4000, refHz);
    for (const f of [2e6, 5e6, 1e7]) {
      const w = 2 * Math.PI * f;
      const s = spectrumAt(k, w);
      expect(s.mag).toBeCloseTo(Math.exp(-c * w), 2);
      expect(s.phase).toBeCloseTo(((2 * c) / Math.PI) * w * Math.log(w / (2 * Math.PI * refHz)), 1);
    }
  });

  it('is causal: next to nothing arrives before the delay, and the spread is late where the Cauchy one is even', () => {
    const causal = lineKernel(model, twoWayM, dt, 4000, refHz);
    const even = lineKernel(model, twoWayM, dt, 4000);
    let before = 0;
    for (let i = 0; i < causal.offset; i++) before += Math.abs(causal.values[i]);
    expect(before).toBeLessThan(0.01);
    const centre = (k: { values: Float64Array; offset: number }, upTo: number) => {
      let m0 = 0;
      let m1 = 0;
      for (let i = 0; i < k.values.length && i - k.offset <= upTo; i++) {
        if (i - k.offset < -upTo) continue;
        m0 += k.values[i];
        m1 += k.values[i] * (i - k.offset);
      }
      return m1 / m0;
    };
    // Within ±200 samples (400 ns) of the delay: the even spread is centred on the delay, the causal one
    // well after it (its phase delay at 5 MHz alone is (2c/π)·ln(ω_ref/ω) = 12.2 ns·ln 50 = 48 ns).
    expect(Math.abs(centre(even, 200))).toBeLessThan(0.5);
    expect(centre(causal, 200)).toBeGreaterThan(10);
  });
});
