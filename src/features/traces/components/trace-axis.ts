import { cableLengthAt } from '../../../../shared/field/route-position';
import type { TraceDetail } from '../../../../shared/schemas/traces';

const C = 299_792_458;

/** Distance along the cable (m, from the measured end) of a time on the file's axis, as the engine reckons it. */
export function timeToDistance(trace: TraceDetail, tNs: number): number {
  return (trace.vf * C * (tNs - trace.zeroNs) * 1e-9) / 2 - (trace.analysis?.leadLengthM ?? 0);
}

export function distanceToTime(trace: TraceDetail, dM: number): number {
  return trace.zeroNs + ((2 * (dM + (trace.analysis?.leadLengthM ?? 0))) / (trace.vf * C)) * 1e9;
}

/** Electrical distance from the measured end to where the cable reaches each marker. */
export function markerDistances(trace: TraceDetail) {
  const run = trace.cableRun;
  return run.markers.map((m) => {
    const fromA = cableLengthAt(run.markers, m.chainageM);
    return { marker: m, distanceM: trace.end === 'A' ? fromA : run.installedLengthM - fromA - m.slackM };
  });
}
