/**
 * Uncertainty window of a located event, with a stated coverage.
 *
 * Each independent source is turned into a standard uncertainty in metres and
 * they are combined in quadrature, then expanded with a coverage factor k = 2
 * for a coverage probability of about 95 % (JCGM 100:2008, "Guide to the
 * expression of uncertainty in measurement", §5.1.2, §6.2 and G.1.3):
 *
 *  - velocity factor: the library's ± tolerance is the half-width of the range
 *    the VF lies in, taken as a rectangular distribution, u = d·T/√3 (§4.3.7);
 *  - sampling: the time axis places the launch and the event each within ±½
 *    sample, rectangular, u = Δ·√2/√12 where Δ is one sample as distance;
 *  - timing: the fitted delay's standard uncertainty from the fit's covariance
 *    (edge-fit.ts), or, for an edge read by construction only, a quarter of its
 *    rise time plus the noise-driven jitter of its low crossing;
 *  - loss model: the delay moves by δ when the loss parameter is made 25 %
 *    larger; with the loss model's relative standard uncertainty r, u = r·δ/0.25.
 *    r is 0.3 for library figures (datasheet against the installed cable, and the
 *    two-term model's own misfit) and 0.5 for loss estimated from the trace;
 *  - dispersion: on lossy lines the effective VF depends on the frequencies a
 *    pulse holds. Two parts, when the VF was not measured at the trace's own
 *    pulse width (a VF measured there already holds them):
 *    · a dielectric with loss tangent tanδ (from the loss model's dielectric
 *      term, α = π·f·tanδ/v) is slower at lower frequencies by (tanδ/π)·ln of
 *      the frequency ratio, the causal partner of a constant tanδ (A. R.
 *      Djordjevic et al., "Wideband frequency-domain characterization of FR-4
 *      and time-domain causality", IEEE Trans. EMC 43 (2001) 662). A VF may have
 *      been measured anywhere within two decades of the launch's band, so the
 *      speed is known to ±(tanδ/π)·ln 100, rectangular;
 *    · what the model leaves out (the conductors' DC resistance, the shape of
 *      the dielectric spread), taken as a tenth of the delay the model put
 *      between the arrival and the edge's middle.
 */
import { distanceFromRoundTrip, SPEED_OF_LIGHT_M_PER_S } from '../cable/propagation';
import type { LineFit, LossSource } from './edge-fit';
import { LOSS_PROBE } from './edge-fit';

/** Coverage probability the window is stated at. */
export const WINDOW_COVERAGE = 0.95;
/** Coverage factor for WINDOW_COVERAGE, a normal distribution's (JCGM 100:2008 G.1.3). */
export const COVERAGE_FACTOR = 2;
/** Relative standard uncertainty of a loss model, by where it came from. */
export const LOSS_MODEL_REL: Record<LossSource, number> = { library: 0.3, estimated: 0.5, none: 0 };
/** The unmodelled dispersion, as a fraction of the delay the loss model put before the edge's middle. */
export const DISPERSION_FRACTION = 0.1;
/** Decades either side of the launch's band within which a VF may have been measured. */
export const VF_BAND_DECADES = 2;

export interface UncertaintyInput {
  distanceM: number;
  vf: number;
  vfTolerance: number;
  /** One sample interval as distance. */
  mPerSample: number;
  /** 10–90 % rise of the event's edge, seconds. */
  riseS: number;
  /** Noise of the working signal per sample, in ρ. */
  sigmaU: number;
  /** The event's reflection coefficient as read. */
  rho: number;
  /** The line fit, where there was one. */
  fit?: LineFit;
  /** The VF was measured at this trace's pulse width, so it holds the line's dispersion. */
  vfAtPulseWidth?: boolean;
}

/** Standard uncertainties of each source, metres, and the expanded half-width of the window. */
export interface UncertaintyBudget {
  vfM: number;
  samplingM: number;
  timingM: number;
  lossM: number;
  dispersionM: number;
  /** Combined standard uncertainty. */
  combinedM: number;
  /** COVERAGE_FACTOR × combined: the window's half-width. */
  expandedM: number;
  coverage: number;
}

export function uncertaintyBudget(x: UncertaintyInput): UncertaintyBudget {
  const vfM = (x.distanceM * x.vfTolerance) / Math.sqrt(3);
  const samplingM = (x.mPerSample * Math.SQRT2) / Math.sqrt(12);
  let timingM: number;
  let lossM = 0;
  let dispersionM = 0;
  if (x.fit) {
    timingM = x.fit.sigmaDelaySamples * x.mPerSample;
    const rel = LOSS_MODEL_REL[x.fit.lossSource];
    lossM = ((rel * x.fit.lossSensitivitySamples) / LOSS_PROBE) * x.mPerSample;
    if (!x.vfAtPulseWidth) {
      const tanDelta = (x.fit.dielectricNpPerMPerHz * x.vf * SPEED_OF_LIGHT_M_PER_S) / Math.PI;
      const dielectricM = (x.distanceM * (tanDelta / Math.PI) * VF_BAND_DECADES * Math.LN10) / Math.sqrt(3);
      const unmodelledM = DISPERSION_FRACTION * x.fit.lossDelaySamples * x.mPerSample;
      dispersionM = Math.hypot(dielectricM, unmodelledM);
    }
  } else {
    // Read by construction: a quarter of the rise, and the low crossing's jitter.
    timingM = distanceFromRoundTrip(0.25 * x.riseS + 2 * (x.sigmaU / Math.max(1e-12, Math.abs(x.rho))) * x.riseS, x.vf);
  }
  const combinedM = Math.sqrt(vfM ** 2 + samplingM ** 2 + timingM ** 2 + lossM ** 2 + dispersionM ** 2);
  return { vfM, samplingM, timingM, lossM, dispersionM, combinedM, expandedM: COVERAGE_FACTOR * combinedM, coverage: WINDOW_COVERAGE };
}

/** Half-width of the window the event is expected in, metres, at WINDOW_COVERAGE. */
export function estimateUncertainty(x: UncertaintyInput): number {
  return uncertaintyBudget(x).expandedM;
}

/** The budget as an analysis reports it: each standard uncertainty, rounded to the millimetre. */
export function budgetView(b: UncertaintyBudget): Omit<UncertaintyBudget, 'expandedM' | 'coverage'> {
  const mm = (x: number) => Math.round(x * 1000) / 1000;
  return { vfM: mm(b.vfM), samplingM: mm(b.samplingM), timingM: mm(b.timingM), lossM: mm(b.lossM), dispersionM: mm(b.dispersionM), combinedM: mm(b.combinedM) };
}
