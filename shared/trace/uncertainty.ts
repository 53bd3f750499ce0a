/**
 * Uncertainty window of a located event: the root-sum-square of independent
 * contributions (JCGM 100:2008, "Guide to the expression of uncertainty in
 * measurement", §5.1): the velocity factor's tolerance scaled to the distance,
 * one sample of the time axis, and the edge's own timing spread (a quarter of
 * its rise time plus the noise-driven jitter of the low crossing).
 */
import { distanceFromRoundTrip } from '../cable/propagation';

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
  /** The event's reflection coefficient. */
  rho: number;
}

/** Half-width of the window the event is expected in, metres. */
export function estimateUncertainty(x: UncertaintyInput): number {
  const edgeM = distanceFromRoundTrip(0.25 * x.riseS + 2 * (x.sigmaU / Math.max(1e-12, Math.abs(x.rho))) * x.riseS, x.vf);
  return Math.sqrt((x.distanceM * x.vfTolerance) ** 2 + x.mPerSample ** 2 + edgeM ** 2);
}
