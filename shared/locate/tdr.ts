/**
 * TDR readings as location estimates.
 *
 * One end: the engine's reading d = VF·c·t/2 with its standard uncertainty
 * (shared/trace: VF tolerance, sampling, edge width). The part that comes from
 * the velocity factor, d·u(VF)/VF, is the same error for every single-ended
 * reading on the same cable with the same VF, so it is named as a shared
 * source: read from end A it pushes the fault one way, read from end B the
 * other, which is what lets the fusion use both.
 *
 * Both ends: d_A = L·t_A/(t_A + t_B) (shared/field/two-ended.ts), free of the
 * VF; its error comes from the installed length and the two round-trip times.
 * When the same traces also give single-ended readings, name each trace's
 * timing as a shared source on both (`timingSource`, `timingSourceA/B`) so the
 * fusion knows the two-ended reading repeats their timing; otherwise the
 * timing errors are taken as independent (a few centimetres per nanosecond
 * against metres from the VF).
 */
import { SPEED_OF_LIGHT_M_PER_S } from '../cable/propagation';
import { twoEndedLocation } from '../field/two-ended';
import { LocateInputError, finite, nonNegative, positive } from './errors';
import { buildEstimate, type CableEnd, type CableRunInput, type LocationEstimate, type UncertainInput } from './estimate';

/** Source id of the velocity factor's error for single-ended readings on one cable. */
export const VF_SOURCE = 'velocity-factor';

export interface SingleEndedTdrReading {
  fromEnd: CableEnd;
  distanceM: number;
  standardUncertaintyM: number;
  /**
   * Relative standard uncertainty of the VF the reading used (0.02 = 2 %).
   * When given, d·u(VF) is split out of the reading's uncertainty as a shared
   * source; the rest stays the reading's own.
   */
  vfRelativeU?: number;
  /** Names the VF's error source; readings with the same VF share it. */
  vfSource?: string;
  /** Names the timing error's source (the trace), shared with a two-ended reading of the same trace. */
  timingSource?: string;
  label?: string;
}

/**
 * The round-trip timing uncertainty behind a single-ended reading, ns: the part
 * of its uncertainty that is not the VF's, turned back into time through
 * d = VF·c·t/2.
 */
export function timingUncertaintyNs(distanceM: number, standardUncertaintyM: number, vf: number, vfRelativeU: number): number {
  const rest = Math.sqrt(Math.max(0, standardUncertaintyM ** 2 - (distanceM * vfRelativeU) ** 2));
  return (2 * rest) / (vf * SPEED_OF_LIGHT_M_PER_S) / 1e-9;
}

export function singleEndedTdr(id: string, run: CableRunInput, r: SingleEndedTdrReading, field = id): LocationEstimate {
  const d = nonNegative(`${field}.distanceM`, r.distanceM, 'TDR distance');
  const u = positive(`${field}.standardUncertaintyM`, r.standardUncertaintyM, 'standard uncertainty of the TDR distance');
  const rel =
    r.vfRelativeU === undefined ? 0 : nonNegative(`${field}.vfRelativeU`, r.vfRelativeU, 'relative uncertainty of the VF');
  const vfPart = Math.min(u, d * rel);
  const rest = Math.sqrt(Math.max(0, u * u - vfPart * vfPart));
  const inputs: Record<'vfScale' | 'reading', UncertainInput> = {
    // The reading scales with the VF: d·(1 + δ), δ with standard uncertainty u(VF)/VF.
    vfScale: { value: 1, u: d > 0 ? vfPart / d : 0, label: 'velocity factor', source: r.vfSource ?? VF_SOURCE },
    reading: { value: d, u: rest, label: 'timing, sampling and edge of the reading', source: r.timingSource },
  };
  return buildEstimate({
    id,
    method: 'tdr-single-ended',
    label: r.label,
    fromEnd: r.fromEnd,
    run,
    inputs,
    distanceFromEnd: (x) => x.reading * x.vfScale,
    field,
  });
}

export interface TwoEndedTdrReading {
  roundTripANs: number;
  roundTripBNs: number;
  /** Standard uncertainty of each round-trip time, ns (or one per end below). */
  roundTripUNs?: number;
  roundTripAUNs?: number;
  roundTripBUNs?: number;
  /** Shared timing sources: the traces the times come from. */
  timingSourceA?: string;
  timingSourceB?: string;
  label?: string;
}

export function twoEndedTdr(id: string, run: CableRunInput, r: TwoEndedTdrReading, field = id): LocationEstimate {
  const tA = positive(`${field}.roundTripANs`, r.roundTripANs, 'round-trip time from end A');
  const tB = positive(`${field}.roundTripBNs`, r.roundTripBNs, 'round-trip time from end B');
  const utA = nonNegative(
    `${field}.roundTripAUNs`,
    r.roundTripAUNs ?? r.roundTripUNs,
    'uncertainty of the round-trip time from end A',
  );
  const utB = nonNegative(
    `${field}.roundTripBUNs`,
    r.roundTripBUNs ?? r.roundTripUNs,
    'uncertainty of the round-trip time from end B',
  );
  finite('installedLengthM', run.installedLengthM, 'installed length');
  const inputs: Record<'tA' | 'tB', UncertainInput> = {
    tA: { value: tA, u: utA, label: 'round-trip time from end A', source: r.timingSourceA },
    tB: { value: tB, u: utB, label: 'round-trip time from end B', source: r.timingSourceB },
  };
  const estimate = buildEstimate({
    id,
    method: 'tdr-two-ended',
    label: r.label ?? 'TDR from both ends',
    fromEnd: 'A',
    run,
    inputs,
    distanceFromEnd: (x) =>
      twoEndedLocation({ installedLengthM: x.installedLengthM, roundTripANs: x.tA, roundTripBNs: x.tB }).distanceFromAM,
    field,
  });
  const vf = twoEndedLocation({ installedLengthM: run.installedLengthM, roundTripANs: tA, roundTripBNs: tB }).impliedVf;
  if (!(vf > 0.3 && vf <= 1)) {
    throw new LocateInputError(
      'OUT_OF_RANGE',
      field,
      `the two round-trip times imply a velocity factor of ${vf.toFixed(3)} over ${run.installedLengthM} m: ` +
        'check that both traces saw the same fault and that the installed length is right',
    );
  }
  estimate.notes.push(`the two readings together imply a velocity factor of ${vf.toFixed(4)}`);
  return estimate;
}
