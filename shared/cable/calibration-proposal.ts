/**
 * What to put in the library when a field calibration is accepted: the mean
 * VF of every accepted calibration of the cable type (this one included), and
 * a tolerance from their spread, for the planner to confirm or change.
 *
 * Tolerance = 2·s / mean (two sample standard deviations, about 95 % of
 * cables of the type if their VFs spread normally), never under 1 %: a VF
 * from a known length is rarely better than that, since the as-built length
 * and the reading of the far end's edge each carry some tenths of a percent
 * (common practice). With a single calibration there is no spread to go on:
 * 2 % is proposed (common practice for one known-length calibration), or the
 * entry's present tolerance if that is already tighter, but not under 1 %.
 */
import { calibrationStats } from './calibration';

export const TOLERANCE_FLOOR = 0.01;
export const SINGLE_CALIBRATION_TOLERANCE = 0.02;

export type ToleranceRule = 'spread' | 'floor' | 'single';

export interface VfProposal {
  /** Calibrations the proposal rests on (the accepted ones and this one). */
  count: number;
  mean: number;
  /** Sample standard deviation (n − 1); null for a single calibration. */
  stdDev: number | null;
  /** The VF to store: the mean, to four decimals (the library's precision). */
  vf: number;
  /** ± fraction, rounded up to 0.1 %. */
  vfTolerance: number;
  rule: ToleranceRule;
}

const roundUpTo = (v: number, step: number) => Math.ceil(v / step - 1e-9) * step;

export function proposeVf(acceptedVfs: readonly number[], newVf: number, currentTolerance: number): VfProposal {
  const stats = calibrationStats([...acceptedVfs, newVf]);
  const mean = stats.mean!;
  let tolerance: number;
  let rule: ToleranceRule;
  if (stats.stdDev === null) {
    tolerance = Math.max(TOLERANCE_FLOOR, Math.min(currentTolerance, SINGLE_CALIBRATION_TOLERANCE));
    rule = 'single';
  } else {
    const fromSpread = (2 * stats.stdDev) / mean;
    rule = fromSpread >= TOLERANCE_FLOOR ? 'spread' : 'floor';
    tolerance = Math.max(TOLERANCE_FLOOR, fromSpread);
  }
  return {
    count: stats.count,
    mean,
    stdDev: stats.stdDev,
    vf: Math.round(mean * 1e4) / 1e4,
    vfTolerance: Math.round(roundUpTo(tolerance, 0.001) * 1e6) / 1e6,
    rule,
  };
}
