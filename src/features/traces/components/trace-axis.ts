import { distanceFromRoundTrip, roundTripFromDistance } from '../../../../shared/cable/propagation';
import { cableLengthAt } from '../../../../shared/field/route-position';
import type { TraceDetail } from '../../../../shared/schemas/traces';

/** Distance along the cable (m, from the measured end) of a time on the file's axis, as the engine reckons it. */
export function timeToDistance(trace: TraceDetail, tNs: number): number {
  return distanceFromRoundTrip((tNs - trace.zeroNs) * 1e-9, trace.vf) - (trace.analysis?.leadLengthM ?? 0);
}

export function distanceToTime(trace: TraceDetail, dM: number): number {
  return trace.zeroNs + roundTripFromDistance(dM + (trace.analysis?.leadLengthM ?? 0), trace.vf) * 1e9;
}

/** Electrical distance from the measured end to where the cable reaches each marker. */
export function markerDistances(trace: TraceDetail) {
  const run = trace.cableRun;
  return run.markers.map((m) => {
    const fromA = cableLengthAt(run.markers, m.chainageM);
    return { marker: m, distanceM: trace.end === 'A' ? fromA : run.installedLengthM - fromA - m.slackM };
  });
}
