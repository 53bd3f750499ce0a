/**
 * Two-ended location. With round-trip times t_A and t_B to the same fault from
 * the two ends of a cable of installed length L, the propagation velocity
 * cancels out:  v·t_A/2 + v·t_B/2 = L  ⇒  d_A = L·t_A / (t_A + t_B).
 * The implied velocity factor is v/c = 2L / (c·(t_A + t_B)).
 */
import { SPEED_OF_LIGHT_M_PER_S } from '../cable/propagation';

export interface TwoEndedInput {
  installedLengthM: number;
  roundTripANs: number;
  roundTripBNs: number;
  /** Single-ended distances as each trace reported them (from its own end), for comparison. */
  singleEndedAM?: number;
  singleEndedBM?: number;
}

export interface TwoEndedResult {
  /** Fault distance from end A, independent of the velocity factor. */
  distanceFromAM: number;
  distanceFromBM: number;
  /** The velocity factor the two readings imply together. */
  impliedVf: number;
  /** Single-ended reading from A minus the two-ended position (positive: A read long). */
  disagreementAM: number | null;
  /** Single-ended reading from B, turned into distance from A, minus the two-ended position. */
  disagreementBM: number | null;
}

export function twoEndedLocation(input: TwoEndedInput): TwoEndedResult {
  const { installedLengthM: L, roundTripANs: tA, roundTripBNs: tB } = input;
  if (!(L > 0)) throw new RangeError('installed length must be more than zero');
  if (!(tA > 0) || !(tB > 0)) throw new RangeError('both round-trip times must be more than zero');
  const dA = (L * tA) / (tA + tB);
  const impliedVf = (2 * L) / (SPEED_OF_LIGHT_M_PER_S * (tA + tB) * 1e-9);
  return {
    distanceFromAM: dA,
    distanceFromBM: L - dA,
    impliedVf,
    disagreementAM: input.singleEndedAM === undefined ? null : input.singleEndedAM - dA,
    disagreementBM: input.singleEndedBM === undefined ? null : L - input.singleEndedBM - dA,
  };
}
