import { describe, expect, it } from 'vitest';
import { dielectricSpread, zeroPhaseLineKernel } from '../../../shared/trace/loss';

describe('the zero-phase line kernel', () => {
  it('is the Lorentzian c/(π(c² + t²)) for dielectric loss alone, the transform of exp(−c·|ω|) (R. N. Bracewell, "The Fourier Transform and Its Applications", 3rd ed., table of transform pairs)', () => {
    const model = { skinNpPerMRootHz: 0, dielectricNpPerMPerHz: 2e-11 };
    const dt = 1e-9;
    const twoWayM = 400;
    const c = dielectricSpread(model, twoWayM);
    // 2d·g·f = c·|ω| with c = 2d·g/(2π): here 400·2e-11/2π s = 1.27 ns.
    expect(c).toBeCloseTo((400 * 2e-11) / (2 * Math.PI), 15);
    const k = zeroPhaseLineKernel(model, twoWayM, dt, 400);
    // The record holds frequencies up to F = 1/(2·dt) only: the Lorentzian band-limited there is
    // 2∫₀^F e^(−af)·cos(bf) df = 2[a − e^(−aF)(a·cos bF − b·sin bF)]/(a² + b²), a = 2πc, b = 2πt,
    // times the sample interval (integral tables, e.g. I. S. Gradshteyn and I. M. Ryzhik, 2.663).
    const F = 1 / (2 * dt);
    const a = 2 * Math.PI * c;
    for (const j of [0, 1, 2, 5, 20]) {
      const b = 2 * Math.PI * j * dt;
      const bandLimited = (2 * (a - Math.exp(-a * F) * (a * Math.cos(b * F) - b * Math.sin(b * F)))) / (a * a + b * b);
      const expected = dt * bandLimited;
      expect(Math.abs(k.values[k.offset + j] / expected - 1)).toBeLessThan(0.005);
      // Within 2 % of the unlimited Lorentzian c/(π(c² + t²)) too.
      expect(Math.abs(k.values[k.offset + j] / ((dt * c) / (Math.PI * (c * c + (j * dt) ** 2))) - 1)).toBeLessThan(0.02);
    }
  });

  it('is even about the delay, and holds the line DC gain exp(−2d·r): all of the step for no resistive loss (common practice: a real even spectrum has a real even transform)', () => {
    const skinOnly = zeroPhaseLineKernel({ skinNpPerMRootHz: 2e-7, dielectricNpPerMPerHz: 0 }, 300, 1e-9, 4000);
    for (const j of [1, 3, 10, 50]) expect(skinOnly.values[skinOnly.offset + j]).toBeCloseTo(skinOnly.values[skinOnly.offset - j], 12);
    // H(0) = 1; the kernel is cut at ±4 µs, and the skin response's slow tails leave about 1 % outside.
    const sum = skinOnly.values.reduce((a, b) => a + b, 0);
    expect(sum).toBeGreaterThan(0.98);
    expect(sum).toBeLessThanOrEqual(1 + 1e-9);
    const resistive = zeroPhaseLineKernel({ skinNpPerMRootHz: 0, dielectricNpPerMPerHz: 1e-11, resistiveNpPerM: 1e-3 }, 500, 1e-9, 2000);
    // exp(−500 · 0.001) = exp(−0.5) = 0.60653, less the Lorentzian's tails beyond ±2 µs, 2c/(πT) of it (2.5e-4).
    const c = dielectricSpread({ skinNpPerMRootHz: 0, dielectricNpPerMPerHz: 1e-11 }, 500);
    expect(resistive.values.reduce((a, b) => a + b, 0) / (0.60653 * (1 - (2 * c) / (Math.PI * 2e-6))) - 1).toBeLessThan(1e-4);
    expect(resistive.values.reduce((a, b) => a + b, 0) / (0.60653 * (1 - (2 * c) / (Math.PI * 2e-6))) - 1).toBeGreaterThan(-1e-4);
    // Its step reaches half of its final height at the delay itself.
    let below = 0;
    for (let i = 0; i < skinOnly.offset; i++) below += skinOnly.values[i];
    expect(below + skinOnly.values[skinOnly.offset] / 2).toBeCloseTo(sum / 2, 9);
  });
});
