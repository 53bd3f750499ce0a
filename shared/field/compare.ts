/**
 * Baseline comparison: a later trace of a run against its reference trace,
 * taken from the same end. The reference is resampled onto the later trace's
 * time axis by linear interpolation and subtracted; an event is "new" when
 * no reference event of the same polarity lies within the two events'
 * combined uncertainty.
 */
export interface ComparableEvent {
  index: number;
  distanceM: number;
  uncertaintyM: number;
  reflectionCoefficient: number;
  type: string;
}

/** Linear interpolation of (xs, ys) at x; holds the end values outside the range. xs ascending. */
export function interpolate(xs: ArrayLike<number>, ys: ArrayLike<number>, x: number): number {
  const n = xs.length;
  if (n === 0) return NaN;
  if (x <= xs[0]) return ys[0];
  if (x >= xs[n - 1]) return ys[n - 1];
  let lo = 0;
  let hi = n - 1;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (xs[mid] <= x) lo = mid;
    else hi = mid;
  }
  const f = (x - xs[lo]) / (xs[hi] - xs[lo]);
  return ys[lo] + f * (ys[hi] - ys[lo]);
}

export function resampleOnto(refX: ArrayLike<number>, refY: ArrayLike<number>, xs: ArrayLike<number>): Float64Array {
  const out = new Float64Array(xs.length);
  for (let i = 0; i < xs.length; i++) out[i] = interpolate(refX, refY, xs[i]);
  return out;
}

export function matchEvents(current: ComparableEvent[], reference: ComparableEvent[]) {
  const used = new Set<number>();
  const newEvents: ComparableEvent[] = [];
  for (const e of current) {
    let best: ComparableEvent | null = null;
    for (const r of reference) {
      if (used.has(r.index)) continue;
      if (Math.sign(r.reflectionCoefficient) !== Math.sign(e.reflectionCoefficient)) continue;
      const gap = Math.abs(r.distanceM - e.distanceM);
      if (gap <= e.uncertaintyM + r.uncertaintyM && (!best || gap < Math.abs(best.distanceM - e.distanceM))) best = r;
    }
    if (best) used.add(best.index);
    else newEvents.push(e);
  }
  return { newEvents, missing: reference.filter((r) => !used.has(r.index)) };
}
