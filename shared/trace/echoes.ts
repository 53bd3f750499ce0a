/**
 * Echoes: reflections that are not faults. A strong reflection returns again
 * at 2× and 3× its round trip (re-reflected at the instrument), and a wave
 * trapped between two events a and b arrives at 2·t_b − t_a (the bounce, or
 * lattice, diagram: L. V. Bewley, "Traveling Waves on Transmission Systems",
 * 2nd ed., Wiley 1951, ch. 3). Beyond an open or a short the line is
 * invisible, so weaker features after it are its echoes or the tail of its own
 * spread edge.
 */
import type { ReflectionEvent, TraceWarning } from '../schemas/trace-analysis';
import type { Measured } from './steps';

/**
 * Echo pre-pass on the measured edges (round trips in samples), so an echo after
 * the far end does not stop the end being typed as the end.
 */
export function preliminaryEchoes(merged: Measured[], rtOf: (m: Measured) => number): boolean[] {
  return merged.map((e, ei) => {
    const tol = Math.max(3, 0.6 * e.riseSamples, 0.004 * rtOf(e));
    for (let si = 0; si < ei; si++) {
      const sm = merged[si];
      if (Math.abs(e.height) > Math.abs(sm.height)) continue;
      if (Math.abs(sm.height) >= 0.3 && (Math.abs(rtOf(e) - 2 * rtOf(sm)) < tol || Math.abs(rtOf(e) - 3 * rtOf(sm)) < tol))
        return true;
      for (let ai = 0; ai < si; ai++) {
        const bounce = Math.abs(merged[ai].height * sm.height);
        if (Math.abs(rtOf(e) - (2 * rtOf(sm) - rtOf(merged[ai]))) < tol && Math.abs(e.height) < 1.5 * bounce + 0.02) return true;
      }
    }
    return false;
  });
}

/** The earlier event `e` is probably an echo of, or null. */
function echoSource(e: ReflectionEvent, events: ReflectionEvent[], dtNs: number): number | null {
  const tol = Math.max(3 * dtNs, 0.6 * e.riseTimeNs, 0.004 * e.roundTripNs);
  for (const s of events) {
    if (
      s.index >= e.index ||
      Math.abs(s.reflectionCoefficient) < 0.1 ||
      Math.abs(e.reflectionCoefficient) > Math.abs(s.reflectionCoefficient)
    )
      continue;
    const strong = Math.abs(s.reflectionCoefficient) >= 0.3;
    if (strong && (Math.abs(e.roundTripNs - 2 * s.roundTripNs) < tol || Math.abs(e.roundTripNs - 3 * s.roundTripNs) < tol))
      return s.index;
    for (const a of events) {
      if (a.index >= s.index || a.likelyMultipleOf !== null) continue;
      const bounce = Math.abs(a.reflectionCoefficient * s.reflectionCoefficient);
      if (
        Math.abs(e.roundTripNs - (2 * s.roundTripNs - a.roundTripNs)) < tol &&
        Math.abs(e.reflectionCoefficient) < 1.5 * bounce + 0.02
      )
        return s.index;
    }
  }
  return null;
}

/** Mark echoes, drop what lies beyond the cable's end, and flag the end. Returns the warnings raised. */
export function resolveEchoes(events: ReflectionEvent[], dtNs: number): TraceWarning[] {
  const warnings: TraceWarning[] = [];
  for (const e of events) e.likelyMultipleOf = echoSource(e, events, dtNs);
  const endIdx = events.findIndex((e) => e.likelyMultipleOf === null && (e.type === 'open' || e.type === 'short'));
  if (endIdx >= 0) {
    const end = events[endIdx];
    let dropped = 0;
    for (let k = events.length - 1; k > endIdx; k--) {
      const e = events[k];
      if (e.likelyMultipleOf === null && Math.abs(e.reflectionCoefficient) < 0.3 * Math.abs(end.reflectionCoefficient)) {
        events.splice(k, 1);
        dropped++;
      }
    }
    events.forEach((e, k) => {
      e.index = k;
    });
    if (dropped > 0) {
      warnings.push({
        code: 'AFTER_END_IGNORED',
        message: `${dropped} weak feature(s) after the ${end.type} at ${end.distanceM.toFixed(1)} m were ignored as its echoes`,
      });
    }
  }
  const primaries = events.filter((e) => e.likelyMultipleOf === null);
  const lastPrimary = primaries[primaries.length - 1];
  if (lastPrimary && (lastPrimary.type === 'open' || lastPrimary.type === 'short')) lastPrimary.isCableEnd = true;
  return warnings;
}
