import { describe, expect, it } from 'vitest';
import {
  attenuationDbPer100m,
  attenuationFromLineConstants,
  DB_PER_NEPER,
  dielectricSpread,
  erfc,
  lineKernel,
  lossModelFromPoints,
  skinParameter,
  skinStep,
} from '../../../shared/trace/loss';

/** Time at which the skin-effect step first reaches `level`, by bisection. */
function timeToReach(k: number, level: number): number {
  let lo = 0;
  let hi = 1;
  while (skinStep(k, hi) < level) hi *= 2;
  for (let i = 0; i < 200; i++) {
    const mid = (lo + hi) / 2;
    if (skinStep(k, mid) < level) lo = mid;
    else hi = mid;
  }
  return (lo + hi) / 2;
}

describe('erfc', () => {
  it('matches tabulated values (M. Abramowitz and I. A. Stegun, Handbook of Mathematical Functions, Table 7.1)', () => {
    // erf 0.5 = 0.5204998778, erf 1 = 0.8427007929, erf 2 = 0.9953222650.
    expect(erfc(0)).toBeCloseTo(1, 7);
    expect(erfc(0.5)).toBeCloseTo(1 - 0.5204998778, 7);
    expect(erfc(1)).toBeCloseTo(1 - 0.8427007929, 7);
    expect(erfc(2) / (1 - 0.995322265) - 1).toBeLessThan(1.2e-7 * 10);
    expect(erfc(-1)).toBeCloseTo(1 + 0.8427007929, 7);
  });
});

describe('the skin-effect edge erfc(K / 2√t) (R. L. Wigington and N. S. Nahman, Proc. IRE 45 (1957) 166)', () => {
  // erfc(x) = 0.5 at x = 0.476936, 0.1 at x = 1.163087 and 0.9 at x = 0.088856 (erf 0.5, 0.9, 0.1;
  // Abramowitz and Stegun Table 7.1); v(t) = erfc(K/2√t) reaches a level at t = K²/(4x²).
  const t50 = 1 / (4 * 0.476936 ** 2); // 1.0990·K²
  const t10to90 = 1 / (4 * 0.088856 ** 2) - 1 / (4 * 1.163087 ** 2); // 31.48·K²

  it('reaches half height at 1.099·K² and rises 10–90 % in 31.48·K²', () => {
    for (const k of [1e-5, 3e-4, 2e-3]) {
      expect(timeToReach(k, 0.5) / (k * k)).toBeCloseTo(t50, 3);
      expect((timeToReach(k, 0.9) - timeToReach(k, 0.1)) / (k * k) / t10to90).toBeCloseTo(1, 3);
    }
  });

  it('takes K from the skin loss so that |H| = exp(−K√(πf)) is the round trip’s attenuation', () => {
    // 2d = 1000 m of a line with α = 2e-6·√f Np/m: at 1 MHz the round trip loses 2e-6·1000·1000 = 2 Np.
    const model = { skinNpPerMRootHz: 2e-6, dielectricNpPerMPerHz: 0 };
    const k = skinParameter(model, 1000);
    expect(k * Math.sqrt(Math.PI * 1e6)).toBeCloseTo(2, 9);
    // The same 2 Np is 2·8.686 = 17.37 dB over 1000 m: 1.737 dB per 100 m.
    expect(attenuationDbPer100m(model, 1e6)).toBeCloseTo(2 * DB_PER_NEPER * 0.1, 9);
  });

  it('samples its response in cells whose running sum is the step at each cell’s end', () => {
    const dt = 1e-9;
    const k = 5e-4; // t50 = 1.099·K² = 275 ns
    const kernel = lineKernel({ skinNpPerMRootHz: (k * Math.sqrt(Math.PI)) / 800, dielectricNpPerMPerHz: 0 }, 800, dt, 5000);
    expect(kernel.offset).toBe(0);
    let sum = 0;
    for (const i of [0, 100, 275, 1000]) {
      sum = kernel.values.slice(0, i + 1).reduce((a, b) => a + b, 0);
      expect(sum).toBeCloseTo(skinStep(k, (i + 0.5) * dt), 9);
    }
  });

  it('spreads a dielectric loss symmetrically, with the Cauchy half-width c = d·g/π', () => {
    // g = 1e-10 Np/m/Hz over 2d = 2000 m: c = 2000·1e-10/(2π) = 3.18e-8 s.
    const model = { skinNpPerMRootHz: 0, dielectricNpPerMPerHz: 1e-10 };
    expect(dielectricSpread(model, 2000)).toBeCloseTo(2000e-10 / (2 * Math.PI), 15);
    const kernel = lineKernel(model, 2000, 1e-8, 4000);
    const v = kernel.values;
    const o = kernel.offset;
    expect(v[o + 3]).toBeCloseTo(v[o - 3], 12);
    // Half the Cauchy weight lies within ±c: cells out to ±3 samples (±30 ns ≈ c) hold about half.
    const within = v.slice(o - 3, o + 4).reduce((a, b) => a + b, 0);
    expect(within).toBeGreaterThan(0.45);
    expect(within).toBeLessThan(0.6);
  });
});

describe('the loss model from attenuation points', () => {
  const np = (db: number) => db / 100 / DB_PER_NEPER;

  it('recovers the skin and dielectric terms of points made from α = s√f + g·f + r', () => {
    // s = 2e-6 Np/m/√Hz, g = 3e-11 Np/m/Hz, and a DC-resistance term r = 1e-3 Np/m (α ≈ R/2Z0, D. M. Pozar,
    // "Microwave Engineering", 4th ed., eq. 2.85) that changes no edge's shape.
    const alpha = (f: number) => 2e-6 * Math.sqrt(f) + 3e-11 * f + 1e-3;
    const points = [1e5, 1e6, 1e7, 1e8, 1e9].map((f) => ({ frequencyHz: f, dbPer100m: alpha(f) * 100 * DB_PER_NEPER }));
    const m = lossModelFromPoints(points);
    expect(m.skinNpPerMRootHz).toBeCloseTo(2e-6, 9);
    expect(m.dielectricNpPerMPerHz / 3e-11).toBeCloseTo(1, 6);
  });

  it('takes one point as skin loss, and keeps every term non-negative', () => {
    const one = lossModelFromPoints([{ frequencyHz: 1e7, dbPer100m: 5 }]);
    expect(one.skinNpPerMRootHz / (np(5) / Math.sqrt(1e7))).toBeCloseTo(1, 12);
    expect(one.dielectricNpPerMPerHz).toBe(0);
    // Attenuation falling with frequency fits no physical term: nothing negative comes out.
    const odd = lossModelFromPoints([
      { frequencyHz: 1e6, dbPer100m: 5 },
      { frequencyHz: 1e7, dbPer100m: 2 },
    ]);
    expect(odd.skinNpPerMRootHz).toBeGreaterThanOrEqual(0);
    expect(odd.dielectricNpPerMPerHz).toBeGreaterThanOrEqual(0);
    expect(lossModelFromPoints([])).toEqual({ skinNpPerMRootHz: 0, dielectricNpPerMPerHz: 0 });
  });
});

describe('attenuation from line constants', () => {
  const line = { lHPerM: 2.5e-7, cFPerM: 1e-10 }; // Z0 = √(L/C) = 50 Ω, v = 1/√(LC) = 2e8 m/s

  it('gives the low-loss terms α = R/(2Z0) and α = β·tanδ/2 (Pozar, eq. 2.85)', () => {
    // R = 0.1 Ω/m at 100 MHz (ωL = 157 Ω/m ≫ R): α = 1e-3 Np/m = 0.8686 dB/100 m.
    expect(attenuationFromLineConstants({ ...line, rDcOhmPerM: 0.1 }, 1e8)).toBeCloseTo(0.1 * DB_PER_NEPER, 3);
    // β = 2π·1e8/2e8 = 3.1416 rad/m; tanδ = 1e-3: α = 1.5708e-3 Np/m.
    expect(attenuationFromLineConstants({ ...line, lossTangent: 1e-3 }, 1e8)).toBeCloseTo(1.5708e-3 * 100 * DB_PER_NEPER, 3);
  });

  it('gives the resistive pair its exact α, near √(ωRC/2) where R ≫ ωL (the diffusion limit, common practice)', () => {
    // 0.5 mm pair at 1 kHz, G = 0: γ² = (R + jωL)·jωC gives α = √((ωC/2)(√(R² + ω²L²) − ωL));
    // ωC = 3.1730e-7 S/m, ωL = 3.1730e-3 Ω/m, R = 0.176 Ω/m: α = 1.6560e-4 Np/m, against √(ωRC/2) = 1.668e-4.
    const pair = { lHPerM: 5.05e-7, cFPerM: 5.05e-11, rDcOhmPerM: 0.176 };
    const alpha = attenuationFromLineConstants(pair, 1e3) / (100 * DB_PER_NEPER);
    expect(alpha).toBeCloseTo(1.656e-4, 7);
    expect(alpha / 1.668e-4).toBeCloseTo(1, 1);
  });
});
