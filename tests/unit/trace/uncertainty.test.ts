import { describe, expect, it } from 'vitest';
import { SPEED_OF_LIGHT_M_PER_S } from '../../../shared/cable/propagation';
import type { LineFit } from '../../../shared/trace/edge-fit';
import {
  COVERAGE_FACTOR,
  DISPERSION_FRACTION,
  LOSS_MODEL_REL,
  uncertaintyBudget,
  VF_BAND_DECADES,
  WINDOW_COVERAGE,
} from '../../../shared/trace/uncertainty';

const fit = (over: Partial<LineFit> = {}): LineFit => ({
  reference: 'launch',
  lossSource: 'library',
  delaySamples: 1000,
  sigmaDelaySamples: 0,
  heightRaw: 0.5,
  lossSensitivitySamples: 0,
  lossDelaySamples: 0,
  dielectricNpPerMPerHz: 0,
  ...over,
});

const base = { distanceM: 1000, vf: 0.66, vfTolerance: 0, mPerSample: 0, riseS: 0, sigmaU: 0, rho: 0.5 };

describe('the uncertainty budget (JCGM 100:2008, Guide to the expression of uncertainty in measurement)', () => {
  it('states a 95 % window with k = 2 (§6.2, G.1.3)', () => {
    expect(WINDOW_COVERAGE).toBe(0.95);
    expect(COVERAGE_FACTOR).toBe(2);
  });

  it('takes the VF tolerance as a rectangular distribution, u = d·T/√3 (§4.3.7)', () => {
    // d = 1000 m, T = ±3 %: u = 30/√3 = 17.32 m; window ±34.64 m.
    const b = uncertaintyBudget({ ...base, vfTolerance: 0.03, fit: fit() });
    expect(b.vfM).toBeCloseTo(17.3205, 4);
    expect(b.expandedM).toBeCloseTo(34.641, 3);
  });

  it('takes ±½ sample at the launch and at the event as rectangular, u = Δ·√2/√12', () => {
    // Δ = 0.3 m: u = 0.3·1.41421/3.46410 = 0.12247 m.
    expect(uncertaintyBudget({ ...base, mPerSample: 0.3, fit: fit() }).samplingM).toBeCloseTo(0.12247, 5);
  });

  it('adds independent sources in quadrature (§5.1.2): 3 and 4 make 5', () => {
    // VF: d·T/√3 = 3 m with T = 0.0051962; timing: σ = 40 samples of 0.1 m = 4 m.
    const b = uncertaintyBudget({ ...base, vfTolerance: (3 * Math.sqrt(3)) / 1000, fit: fit({ sigmaDelaySamples: 40 }), mPerSample: 0.1 });
    expect(b.timingM).toBeCloseTo(4, 9);
    const sampling = (0.1 * Math.SQRT2) / Math.sqrt(12);
    expect(b.combinedM).toBeCloseTo(Math.sqrt(9 + 16 + sampling ** 2), 9);
    expect(b.expandedM).toBeCloseTo(2 * b.combinedM, 12);
  });

  it('scales the loss model’s effect by its relative uncertainty: u = r·δ/0.25', () => {
    // A 25 % larger loss parameter moved the delay by 8 samples of 0.5 m: δ = 4 m; library r = 0.3 → 4.8 m.
    const b = uncertaintyBudget({ ...base, mPerSample: 0.5, fit: fit({ lossSensitivitySamples: 8 }) });
    expect(LOSS_MODEL_REL.library).toBe(0.3);
    expect(b.lossM).toBeCloseTo((0.3 * 4) / 0.25, 9);
    const estimated = uncertaintyBudget({ ...base, mPerSample: 0.5, fit: fit({ lossSensitivitySamples: 8, lossSource: 'estimated' }) });
    expect(estimated.lossM).toBeCloseTo((0.5 * 4) / 0.25, 9);
  });

  it('widens for dispersion unless the VF was measured at the trace’s own pulse width', () => {
    // tanδ = 0.01 at VF 0.6: α_d = π·f·tanδ/v (Pozar, "Microwave Engineering", 4th ed., eq. 2.85 with G = ωC·tanδ),
    // so g = π·0.01/(0.6·c). Speed known to ±(tanδ/π)·ln 100 = ±1.4659 %: over 1000 m, u = 14.659/√3 = 8.4632 m.
    const g = (Math.PI * 0.01) / (0.6 * SPEED_OF_LIGHT_M_PER_S);
    const x = { ...base, vf: 0.6, mPerSample: 0.1, fit: fit({ dielectricNpPerMPerHz: g, lossDelaySamples: 50 }) };
    const dielectric = (1000 * (0.01 / Math.PI) * VF_BAND_DECADES * Math.LN10) / Math.sqrt(3);
    expect(dielectric).toBeCloseTo(8.4632, 3);
    const unmodelled = DISPERSION_FRACTION * 50 * 0.1;
    expect(uncertaintyBudget(x).dispersionM).toBeCloseTo(Math.hypot(dielectric, unmodelled), 9);
    expect(uncertaintyBudget({ ...x, vfAtPulseWidth: true }).dispersionM).toBe(0);
  });

  it('times an edge read by construction from a quarter of its rise and its noise', () => {
    // Rise 10 ns at VF 0.66: a quarter is 2.5 ns, 0.2473 m one way; noise σ/ρ = 0.01 adds 2·0.01·10 ns = 0.2 ns.
    const b = uncertaintyBudget({ ...base, riseS: 10e-9, sigmaU: 0.005, rho: 0.5 });
    expect(b.timingM).toBeCloseTo((0.66 * SPEED_OF_LIGHT_M_PER_S * 2.7e-9) / 2, 9);
    expect(b.lossM).toBe(0);
  });
});
