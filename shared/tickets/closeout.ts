/**
 * Close-out arithmetic: where the crew found the fault, how far that is from
 * where Rholog located it, and the velocity factor the two imply.
 *
 * A TDR reading is a round-trip time t; the located distance is VF·c·t/2 with
 * the library's VF. The crew's found position is a cable length d_found from
 * the same end, so the VF that would have put the reading exactly there is
 *
 *   VF_implied = 2 · d_found / (c · t)
 *
 * (the propagation relation d = VF·c·t/2 solved for VF). The found position
 * is given either as a cable length from an end, or as a route marker and the
 * ground offset past it; the marker form goes through the run's slack
 * (shared/field/route-position.ts) to become a cable length.
 */
import { SPEED_OF_LIGHT_M_PER_S } from '../cable/propagation';
import { cableLengthAt, chainageAt, routeLengthM, type MarkerLike } from '../field/route-position';

export type CableEnd = 'A' | 'B';

export interface CloseoutRun {
  installedLengthM: number;
  markers: Array<MarkerLike & { id: number }>;
}

export type FoundPosition =
  /** Cable length from one end (a tape along the cable, or the as-built records). */
  | { method: 'distance'; fromEnd: CableEnd; distanceM: number }
  /** Ground offset past a route marker, toward end B. */
  | { method: 'marker'; markerId: number; offsetM: number };

export interface FoundPlace {
  /** Cable length from end A. */
  foundFromAM: number;
  /** Cable length from the end the located reading was taken from. */
  foundDistanceM: number;
  /** Ground chainage from end A. */
  foundChainageM: number;
}

export class CloseoutInputError extends Error {
  constructor(
    public field: string,
    message: string,
  ) {
    super(message);
  }
}

/** Turn the crew's found position into cable lengths; throws CloseoutInputError naming the field when it is off the cable. */
export function foundPlace(run: CloseoutRun, measuredFrom: CableEnd, found: FoundPosition): FoundPlace {
  let foundFromAM: number;
  if (found.method === 'distance') {
    if (!(found.distanceM >= 0) || found.distanceM > run.installedLengthM) {
      throw new CloseoutInputError(
        'found.distanceM',
        `must be between 0 and the installed length (${run.installedLengthM} m) of cable from end ${found.fromEnd}`,
      );
    }
    foundFromAM = found.fromEnd === 'A' ? found.distanceM : run.installedLengthM - found.distanceM;
  } else {
    const marker = run.markers.find((m) => m.id === found.markerId);
    if (!marker) throw new CloseoutInputError('found.markerId', 'is not a route marker of this cable run');
    const chainage = marker.chainageM + found.offsetM;
    const routeLen = routeLengthM(run);
    if (!(found.offsetM >= 0) || chainage > routeLen + 1e-9) {
      throw new CloseoutInputError(
        'found.offsetM',
        `must be 0 or more and stay on the route: ${marker.label} is at ${marker.chainageM} m and the route ends at ${Math.round(routeLen * 10) / 10} m`,
      );
    }
    foundFromAM = cableLengthAt(run.markers, chainage);
  }
  return {
    foundFromAM,
    foundDistanceM: measuredFrom === 'A' ? foundFromAM : run.installedLengthM - foundFromAM,
    foundChainageM: chainageAt(run.markers, foundFromAM).chainageM,
  };
}

/** VF that maps round-trip time `roundTripNs` onto the one-way cable length `distanceM`. */
export function impliedVf(distanceM: number, roundTripNs: number): number {
  return (2 * distanceM) / (SPEED_OF_LIGHT_M_PER_S * roundTripNs * 1e-9);
}

export interface CloseoutResult extends FoundPlace {
  locatedDistanceM: number;
  /** Located minus found, metres of cable: positive when Rholog placed the fault too far out. */
  errorM: number;
  /** |error| as a fraction of the found distance (null when found at the end itself). */
  errorFraction: number | null;
  impliedVf: number | null;
}

/** The located-vs-found comparison for one finding. */
export function compareLocatedFound(
  run: CloseoutRun,
  finding: { measuredFrom: CableEnd; distanceM: number; roundTripNs: number },
  found: FoundPosition,
): CloseoutResult {
  const place = foundPlace(run, finding.measuredFrom, found);
  const errorM = finding.distanceM - place.foundDistanceM;
  return {
    ...place,
    locatedDistanceM: finding.distanceM,
    errorM,
    errorFraction: place.foundDistanceM > 0 ? Math.abs(errorM) / place.foundDistanceM : null,
    impliedVf: place.foundDistanceM > 0 && finding.roundTripNs > 0 ? impliedVf(place.foundDistanceM, finding.roundTripNs) : null,
  };
}

/**
 * The note a close-out files with its calibration. Lengths in metres to the
 * millimetre: each reader sees them in their own unit and precision
 * (lengthsInText), and the millimetre keeps that rounding the one the ticket
 * shows for the same figures (to the centimetre, 45.2477 m was written
 * "45.25 m" and then read "45.3 m" beside the ticket's "45.2 m").
 */
export function closeoutCalibrationNote(ticketId: number, findingId: number, locatedM: number, foundM: number, measuredFrom: CableEnd): string {
  return `Repair close-out of ticket ${ticketId} (finding ${findingId}): located ${locatedM.toFixed(3)} m, found ${foundM.toFixed(3)} m along the cable from end ${measuredFrom}.`;
}
