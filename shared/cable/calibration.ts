/**
 * Field calibration of a velocity factor on a known length: the pulse goes to
 * the far end and back, so 2L = VF · c · t and VF = 2L / (c·t).
 */
import { SPEED_OF_LIGHT_M_PER_S } from './propagation';

/** No practical cable is slower than this; a lower result is almost always a unit slip (µs for ns, ft for m). */
export const CALIBRATION_VF_MIN = 0.2;
/** Nothing travels faster than light: a result above 1 means the length or the time is wrong. */
export const CALIBRATION_VF_MAX = 1;

/** VF from a known one-way length (m) and the round-trip time (s) of its end reflection. */
export function vfFromKnownLength(knownLengthM: number, roundTripS: number): number {
  return (2 * knownLengthM) / (SPEED_OF_LIGHT_M_PER_S * roundTripS);
}

/** The same with the time in nanoseconds, as technicians read it off the instrument. */
export function vfFromKnownLengthNs(knownLengthM: number, roundTripNs: number): number {
  return vfFromKnownLength(knownLengthM, roundTripNs * 1e-9);
}

export interface CalibrationStats {
  count: number;
  mean: number | null;
  /** Sample standard deviation (n − 1); null below two values. */
  stdDev: number | null;
  min: number | null;
  max: number | null;
}

/** Mean, sample standard deviation, count, min and max of a list of VFs. */
export function calibrationStats(values: readonly number[]): CalibrationStats {
  const count = values.length;
  if (count === 0) return { count, mean: null, stdDev: null, min: null, max: null };
  const mean = values.reduce((a, b) => a + b, 0) / count;
  const stdDev = count < 2 ? null : Math.sqrt(values.reduce((a, v) => a + (v - mean) ** 2, 0) / (count - 1));
  // Folded, not spread into Math.min: a spread of some hundred thousand values overflows the call stack.
  return { count, mean, stdDev, min: values.reduce((a, b) => Math.min(a, b)), max: values.reduce((a, b) => Math.max(a, b)) };
}
