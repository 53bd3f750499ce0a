import { describe, expect, it } from 'vitest';
import { SPEED_OF_LIGHT_M_PER_S } from '../../../shared/cable/propagation';
import {
  attenuationFromLineConstants,
  DB_PER_NEPER,
  exactAttenuationNpPerM,
  lossModelFromPoints,
  lossModelThroughLine,
} from '../../../shared/trace/loss';

/**
 * The library's attenuation figures read through the line's exact propagation constant. A thin
 * pair's figure at 100 kHz lies where its DC resistance is already near ωL: read as the high-frequency
 * sum r + s√f + g·f it gives too small a resistance, and every edge and creep built from it too fast.
 */

// A 0.5 mm telephone pair from textbook constants (common practice, from memory): DC loop resistance
// 2ρ/A with copper ρ = 1.724e-8 Ω·m (IEC 60028) = 0.1756 Ω/m; Z0 = 110 Ω, VF 0.66; skin resistance
// 4.6e-4 Ω/m/√Hz (copper's surface resistance over the wires' perimeter, raised 40 % by proximity);
// loss tangent 1e-3 (polyethylene).
const Z0 = 110;
const VF = 0.66;
const v = VF * SPEED_OF_LIGHT_M_PER_S;
const pair = { rDcOhmPerM: 0.1756, skinOhmPerMRootHz: 4.6e-4, lHPerM: Z0 / v, cFPerM: 1 / (Z0 * v), lossTangent: 1e-3 };
const points = [1e5, 1e6, 1e7].map((f) => ({ frequencyHz: f, dbPer100m: attenuationFromLineConstants(pair, f) }));
// The same line in the loss model's terms: R = 2Z0·r, skin 2Z0·s, and G = ωC·tanδ = 2g·f/Z0, so g = π·tanδ/v.
const rTrue = pair.rDcOhmPerM / (2 * Z0);
const sTrue = pair.skinOhmPerMRootHz / (2 * Z0);
const gTrue = (Math.PI * pair.lossTangent) / v;

describe('attenuation through the exact propagation constant', () => {
  it('equals the attenuation computed from the line constants themselves', () => {
    const model = { resistiveNpPerM: rTrue, skinNpPerMRootHz: sTrue, dielectricNpPerMPerHz: gTrue };
    for (const f of [1e4, 1e5, 1e6, 1e7, 1e8]) {
      const fromConstants = attenuationFromLineConstants(pair, f) / (100 * DB_PER_NEPER);
      expect(exactAttenuationNpPerM(model, f, VF) / fromConstants).toBeCloseTo(1, 6);
    }
  });

  it('recovers the pair’s DC resistance from figures at 0.1, 1 and 10 MHz, which the high-frequency sum reads 20 % low or more', () => {
    const exact = lossModelThroughLine(points, VF);
    expect((exact.resistiveNpPerM ?? 0) / rTrue).toBeCloseTo(1, 1);
    expect(exact.skinNpPerMRootHz / sTrue).toBeCloseTo(1, 1);
    // Each figure is met through the exact propagation.
    for (const p of points) expect((exactAttenuationNpPerM(exact, p.frequencyHz, VF) * 100 * DB_PER_NEPER) / p.dbPer100m).toBeCloseTo(1, 4);
    const sum = lossModelFromPoints(points);
    expect((sum.resistiveNpPerM ?? 0) / rTrue).toBeLessThan(0.8);
  });

  it('meets two figures that the sum’s two terms cannot meet through the exact propagation, with its DC term freed', () => {
    // Two figures at 0.1 and 1 MHz of a line whose skin loss far exceeds its DC resistance (R_dc 0.02 Ω/m,
    // skin 6e-4 Ω/m/√Hz, tanδ 1e-3, 110 Ω, VF 0.66): they rise faster than √f, so the sum reads them as
    // skin and dielectric loss, and those two terms through the exact propagation miss the 100 kHz figure.
    // The line has a DC resistance, and with that term free as well the figures are met.
    const line = { rDcOhmPerM: 0.02, skinOhmPerMRootHz: 6e-4, lHPerM: Z0 / v, cFPerM: 1 / (Z0 * v), lossTangent: 1e-3 };
    const two = [1e5, 1e6].map((f) => ({ frequencyHz: f, dbPer100m: attenuationFromLineConstants(line, f) }));
    const sum = lossModelFromPoints(two);
    const sumMisses = two.map((p) => Math.abs((exactAttenuationNpPerM(sum, p.frequencyHz, VF) * 100 * DB_PER_NEPER) / p.dbPer100m - 1));
    expect(Math.max(...sumMisses)).toBeGreaterThan(0.01);
    const exact = lossModelThroughLine(two, VF);
    expect(exact.resistiveNpPerM ?? 0).toBeGreaterThan(0);
    for (const p of two) expect((exactAttenuationNpPerM(exact, p.frequencyHz, VF) * 100 * DB_PER_NEPER) / p.dbPer100m).toBeCloseTo(1, 2);
  });

  it('leaves a low-loss coaxial cable’s model where the sum put it, and keeps every term non-negative', () => {
    // 50 Ω coax, VF 0.66, R_dc 0.01 Ω/m, skin 1e-4 Ω/m/√Hz: ωL ≫ R at every figure.
    const vc = 0.66 * SPEED_OF_LIGHT_M_PER_S;
    const coax = { rDcOhmPerM: 0.01, skinOhmPerMRootHz: 1e-4, lHPerM: 50 / vc, cFPerM: 1 / (50 * vc), lossTangent: 3e-4 };
    const pts = [1e6, 1e7, 1e8].map((f) => ({ frequencyHz: f, dbPer100m: attenuationFromLineConstants(coax, f) }));
    const exact = lossModelThroughLine(pts, 0.66);
    const sum = lossModelFromPoints(pts);
    expect(exact.skinNpPerMRootHz / sum.skinNpPerMRootHz).toBeCloseTo(1, 1);
    expect(exact.skinNpPerMRootHz / (1e-4 / 100)).toBeCloseTo(1, 1);
    for (const term of [exact.resistiveNpPerM ?? 0, exact.skinNpPerMRootHz, exact.dielectricNpPerMPerHz]) expect(term).toBeGreaterThanOrEqual(0);
    // No speed, or no figures: the sum's model as it was.
    expect(lossModelThroughLine(pts, 0)).toEqual(sum);
    expect(lossModelThroughLine([], 0.66)).toEqual(lossModelFromPoints([]));
  });
});
