/**
 * Echoes: reflections that are not faults.
 *
 * A wave that bounces once between two reflectors a and b on its way arrives
 * t_b − t_a after the wave it copies, with about ρ_a·ρ_b of it, so every event e
 * at or beyond b has an echo at t_e + (t_b − t_a), and a weaker one at
 * t_e + 2(t_b − t_a) (the bounce, or lattice, diagram: L. V. Bewley, "Traveling
 * Waves on Transmission Systems", 2nd ed., Wiley 1951, ch. 3). b's own echo
 * (e = b) is A_b·ρ_a′·ρ_b: b's ρ is read only through what stands in front (a
 * junction splits the wave, loss lowers it), so its second reflection is
 * bounded by |ρ_b| ≤ 1, not by that reading. An echo's path is longer than
 * its copy's, so it is never sharper and never early (causality): it may start
 * late by its own spread, early only by the sharper edge's timing error. An
 * echo of a strong event at twice (three times) its round trip from a source
 * not yet measured is at most r·A² (r²·A³), |r| = |ρ_s/(1 + ρ_s)| ≤ 1.5 for
 * a source from ρ_s = −0.6 (a quarter of the cable's impedance) to an open;
 * a measured ρ_s outside that range is not believed. Such a copy of a
 * loss-spread edge may start late by the spread its longer path adds (up to
 * the path squared, for skin loss). An instrument whose source impedance differs from the cable's
 * reflects every returning wave back down the line with its own ρ_s, so an
 * echo of events a and b arrives at t_a + t_b (2·t_a for one event). At the
 * port a returning wave of ρ shows as (1 + ρ_s)·ρ, and its first source echo
 * as (1 + ρ_s)·ρ_s·ρ², so the ratio r = A₂/A₁² of the echo at twice the round
 * trip to the square of the first arrival gives ρ_s = r/(1 − r), whatever the
 * loss or the faults in front (both arrivals carry them squared and once, in
 * the same proportion). Beyond an open or a short the line is invisible, so
 * weaker features after it are its echoes or the tail of its own spread edge.
 */
import type { ReflectionEvent, TraceWarning } from '../schemas/trace-analysis';
import type { Measured } from './steps';

export interface EchoFindings {
  /** For each measured edge, the index of the edge it is probably an echo of, or null. */
  of: Array<number | null>;
  /** Reflection coefficient of the instrument's source, 0 when none is seen. */
  sourceRho: number;
}

const STRONG = 0.3;
/**
 * Lowest source ρ believed: −0.6, a source of a quarter of the cable's impedance (from memory, common
 * practice: instruments drive from 50 Ω or from a source matched to the cable; 25 Ω on a 100 Ω pair is −0.6).
 */
const SOURCE_RHO_MIN = -0.6;
/** Largest |ρ_s/(1 + ρ_s)| for a source from SOURCE_RHO_MIN to an open: 1.5. */
const SOURCE_R = -SOURCE_RHO_MIN / (1 + SOURCE_RHO_MIN);

/**
 * Echo sizes are compared as read at the instrument: an echo has lost at least as much to
 * the cable as the arrivals it copies. The reflectors it bounced between act with their
 * own (loss-corrected) size.
 */
const seenAt = (m: Measured) => Math.abs(m.heightRaw ?? m.height);

function tolerance(m: Measured, rt: number): number {
  return Math.max(3, 0.6 * m.riseSamples, 0.004 * rt);
}

interface EchoContext {
  merged: Measured[];
  rt: number[];
  /** Each edge's own ρ where known (past what stands in front of it), else its height. */
  own: number[];
  sourceRho: number;
}

/** Signal-to-noise above which an edge's own rise is read well enough to bound how late it can be. */
const COPY_RISE_SNR = 10;

/** Which earlier edge `merged[k]` echoes, given the echoes found so far. */
function echoOf(cx: EchoContext, of: Array<number | null>, k: number): number | null {
  const { merged, rt, sourceRho } = cx;
  const e = merged[k];
  const tol = tolerance(e, rt[k]);
  const he = seenAt(e);
  for (let s = 0; s < k; s++) {
    const hs = seenAt(merged[s]);
    if (of[s] !== null) continue;
    // Larger than the arrival it would copy: only a bridged tap's two ways round can make that.
    if (he > hs) {
      if (branchOf(cx, of, k, s)) return s;
      continue;
    }
    // An echo travels further than the wave it copies, so it is no sharper and cannot come early:
    // it may start late by its own spread, early only by the timing error of the sharper edge.
    const early = tolerance(e.riseSamples <= merged[s].riseSamples ? e : merged[s], rt[k]);
    const near = (t: number) => rt[k] - t < tol && t - rt[k] < early;
    // s's copy after n trips (n = 2, 3, re-reflected at the source): a loss-spread edge is timed at its foot,
    // which lags the arrival by up to 0.6 of its spread, and the spread grows at most as the square of the
    // path (skin loss), so the copy's foot may lag n times s's by up to 0.6·rise_s·(n² − n); and by no more
    // than 0.6 of the copy's own spread where that is read well (an edge standing 10 deviations out), so an
    // edge sharper than s is not its late copy.
    const copyRiseKnown = e.snr >= COPY_RISE_SNR;
    const nearCopy = (n: number) => {
      const spreadLag = merged[s].riseSamples * (n * n - n);
      const lateBy = Math.max(tol, 0.6 * (copyRiseKnown ? Math.min(spreadLag, e.riseSamples) : spreadLag));
      return rt[k] - n * rt[s] < lateBy && n * rt[s] - rt[k] < early;
    };
    // Re-reflected at the source once or twice: A₂ = r·A², A₃ = r²·A³ with r = ρ_s/(1 + ρ_s), |r| ≤ 1.5 for any
    // source from ρ_s = −0.6 to an open; anything larger at those times is no source echo and stays a fault.
    const viaSourceOnly = (nearCopy(2) && he < SOURCE_R * hs * hs + 0.02) || (nearCopy(3) && he < SOURCE_R ** 2 * hs ** 3 + 0.02);
    if (hs >= STRONG && viaSourceOnly) return s;
    for (let a = 0; a <= s; a++) {
      if (of[a] !== null) continue;
      const ha = seenAt(merged[a]);
      const viaSource = (a === s ? 1 : 2) * Math.abs(sourceRho / (1 + sourceRho)) * ha * hs;
      if (sourceRho !== 0 && near(rt[a] + rt[s]) && he < 1.5 * viaSource + 0.02) return s;
    }
    if (bounceOf(cx, of, k, s, near)) return s;
  }
  return null;
}

/** Is merged[k] the copy of merged[s] that bounced once or twice between two earlier reflectors a < b ≤ s? */
function bounceOf(cx: EchoContext, of: Array<number | null>, k: number, s: number, near: (t: number) => boolean): boolean {
  const { merged, rt, own } = cx;
  const he = seenAt(merged[k]);
  const hs = seenAt(merged[s]);
  for (let b = 0; b <= s; b++) {
    if (of[b] !== null) continue;
    for (let a = 0; a < b; a++) {
      if (of[a] !== null) continue;
      // b's own echo (s = b) carries b's reflection twice; only |ρ_b| ≤ 1 bounds the second one.
      const gain = Math.min(1, Math.abs(own[a]) * (s === b ? 1 : Math.abs(own[b])));
      const gap = rt[b] - rt[a];
      if (near(rt[s] + gap) && he < 1.5 * gain * hs + 0.02) return true;
      if (near(rt[s] + 2 * gap) && he < 1.5 * gain * gain * hs + 0.02) return true;
    }
  }
  return false;
}

/**
 * Is merged[k] the copy of merged[s] that went round a bridged tap: a junction a (a branch in parallel
 * lowers the impedance, so a drop) and the stub's end b beyond it? The wave back from s passes the
 * junction into the stub with 1 + ρ_a, is sent back by the stub's end with ρ_b (|ρ_b| ≤ 1; seen at the
 * instrument through the junction both ways, as (1 + ρ_a)²·ρ_b) and leaves the junction as the copy did; the wave can also visit the stub first and s second, so the copy arrives
 * rt_b − rt_a after s with 2·(1 + ρ_a)·ρ_b of it (Pozar §2.3, three lines at a node) and the sign of
 * s times the sign of ρ_b. For three equal lines (ρ_a = −1/3) and an open stub that is 4/3 of s: larger
 * than the arrival it copies, which a bounce between two reflectors on one line never is.
 */
function branchOf(cx: EchoContext, of: Array<number | null>, k: number, s: number): boolean {
  const { merged, rt, own } = cx;
  const e = merged[k];
  const he = seenAt(e);
  const hs = seenAt(merged[s]);
  const sign = (m: Measured) => Math.sign(m.heightRaw ?? m.height);
  const tol = tolerance(e, rt[k]);
  for (let b = 1; b < k; b++) {
    if (of[b] !== null || b === s) continue;
    for (let a = 0; a < b; a++) {
      if (of[a] !== null || a === s || own[a] >= 0 || own[a] < -0.6) continue;
      if (sign(e) !== sign(merged[s]) * Math.sign(own[b])) continue;
      const t = rt[s] + (rt[b] - rt[a]);
      if (Math.abs(rt[k] - t) > tol) continue;
      // b is seen through the junction both ways, (1 + ρ_a)²·ρ_b, whatever its own ρ was read as.
      const gain = 2 * Math.min(1 + own[a], seenAt(merged[b]) / (1 + own[a]));
      if (he < 1.2 * gain * hs + 0.02) return true;
    }
  }
  return false;
}

function markEchoes(cx: EchoContext): Array<number | null> {
  const of: Array<number | null> = [];
  for (let k = 0; k < cx.merged.length; k++) of.push(echoOf(cx, of, k));
  return of;
}

/**
 * ρ_s from the strongest pair of events a, b (a = b allowed) whose source echo at
 * t_a + t_b is seen: A_e = m·(1 + ρ_s)·ρ_s·ρ_a·ρ_b with m = 2 when a ≠ b (the wave can
 * visit a first or b first), so r = A_e/(m·A_a·A_b) = ρ_s/(1 + ρ_s). 0 when none is seen.
 */
function sourceReflection(merged: Measured[], rt: number[], of: Array<number | null>): number {
  const primaries = merged.map((_, k) => k).filter((k) => of[k] === null && !merged[k].blip);
  const pairs: Array<[number, number, number]> = [];
  for (const a of primaries) for (const b of primaries) if (a <= b) pairs.push([a, b, seenAt(merged[a]) * seenAt(merged[b])]);
  pairs.sort((p, q) => q[2] - p[2]);
  for (const [a, b, size] of pairs) {
    if (size < 0.02) break;
    const at = rt[a] + rt[b];
    const tol = tolerance(merged[b], at);
    const k = merged.findIndex((_, i) => i > b && Math.abs(rt[i] - at) < tol);
    if (k < 0) continue;
    const raw = (m: Measured) => m.heightRaw ?? m.height;
    const r = raw(merged[k]) / ((a === b ? 1 : 2) * raw(merged[a]) * raw(merged[b]));
    const rhoS = r / (1 - r);
    return Math.abs(rhoS) >= 0.05 && rhoS >= SOURCE_RHO_MIN && rhoS <= 0.9 ? rhoS : 0;
  }
  return 0;
}

/**
 * Echoes among the measured edges (round trips in samples), and the source's ρ they reveal.
 * `ownRho`, each edge's own ρ from a first pass, sizes the bounces between reflectors.
 */
export function findEchoes(merged: Measured[], rtOf: (m: Measured) => number, ownRho?: number[]): EchoFindings {
  const rt = merged.map(rtOf);
  const own = ownRho ?? merged.map((m) => m.height);
  const first = markEchoes({ merged, rt, own, sourceRho: 0 });
  const sourceRho = sourceReflection(merged, rt, first);
  return { of: sourceRho === 0 ? first : markEchoes({ merged, rt, own, sourceRho }), sourceRho };
}

/** Echoes are judged on the heights read at the instrument, not on the events' own ρ. */
const seen = (e: ReflectionEvent) => e.reflectionCoefficientRaw ?? e.reflectionCoefficient;

/** Drop what lies beyond the cable's end, and flag the end. Returns the warnings raised. */
export function resolveCableEnd(events: ReflectionEvent[]): TraceWarning[] {
  const warnings: TraceWarning[] = [];
  const endIdx = events.findIndex((e) => e.likelyMultipleOf === null && (e.type === 'open' || e.type === 'short'));
  if (endIdx >= 0) {
    const end = events[endIdx];
    const renumber = new Map<number, number>();
    // Past the end the line is not seen: a weak feature there is an echo or the end's own
    // spread tail, flagged or not; an echo whose source was dropped goes with it.
    const dropped = new Set<number>();
    events.forEach((e, k) => {
      const weak = k > endIdx && Math.abs(seen(e)) < 0.3 * Math.abs(seen(end));
      const orphan = e.likelyMultipleOf !== null && dropped.has(e.likelyMultipleOf);
      if (weak || orphan) dropped.add(e.index);
    });
    const kept = events.filter((e) => !dropped.has(e.index));
    kept.forEach((e, k) => renumber.set(e.index, k));
    for (const e of kept) {
      e.index = renumber.get(e.index)!;
      if (e.likelyMultipleOf !== null) e.likelyMultipleOf = renumber.get(e.likelyMultipleOf) ?? null;
    }
    events.splice(0, events.length, ...kept);
    if (dropped.size > 0) {
      warnings.push({
        code: 'AFTER_END_IGNORED',
        message: `${dropped.size} weak feature(s) after the ${end.type} at ${end.distanceM.toFixed(1)} m were ignored as its echoes`,
      });
    }
  }
  const primaries = events.filter((e) => e.likelyMultipleOf === null);
  const lastPrimary = primaries[primaries.length - 1];
  if (lastPrimary && (lastPrimary.type === 'open' || lastPrimary.type === 'short')) lastPrimary.isCableEnd = true;
  return warnings;
}
