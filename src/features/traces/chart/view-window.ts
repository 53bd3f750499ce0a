import { decimateMinMax } from '../../../../shared/trace/decimate';
import type { ChartPoint } from './gain';

/** First index whose x is at least `x` (points in ascending x). */
function lowerBound(points: readonly ChartPoint[], x: number): number {
  let lo = 0;
  let hi = points.length;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if (points[mid].x < x) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

/** The points between min and max, with one more either side so the line runs to the plot's edges. */
export function visibleSlice(points: readonly ChartPoint[], min: number, max: number): ChartPoint[] {
  const from = Math.max(0, lowerBound(points, min) - 1);
  const to = Math.min(points.length, lowerBound(points, max) + 1);
  return points.slice(from, to);
}

/**
 * What to draw for the visible range: the points inside it, min/max decimated
 * to about two per pixel, so zooming shows more detail and a long record
 * never sends more points to the canvas than it has pixels for.
 */
export function pointsForView(points: readonly ChartPoint[], min: number, max: number, widthPx: number): ChartPoint[] {
  const slice = visibleSlice(points, min, max);
  const buckets = Math.max(50, Math.round(widthPx));
  if (slice.length <= 2 * buckets) return slice;
  const x = new Float64Array(slice.length);
  const y = new Float64Array(slice.length);
  slice.forEach((p, i) => {
    x[i] = p.x;
    y[i] = p.y;
  });
  return decimateMinMax(x, y, buckets);
}

export interface Range {
  min: number;
  max: number;
}

/**
 * Zoom by `factor` (> 1 closer, < 1 farther) keeping `anchor` where it is
 * on screen, within the limits and never narrower than `minSpan`.
 */
export function zoomRange(range: Range, factor: number, anchor: number, limits: Range, minSpan: number): Range {
  const span = Math.min(limits.max - limits.min, Math.max(minSpan, (range.max - range.min) / factor));
  const share = range.max > range.min ? (anchor - range.min) / (range.max - range.min) : 0.5;
  return clampRange({ min: anchor - share * span, max: anchor - share * span + span }, limits);
}

/** Move the range by `delta` (axis units), keeping its width, within the limits. */
export function panRange(range: Range, delta: number, limits: Range): Range {
  return clampRange({ min: range.min + delta, max: range.max + delta }, limits);
}

function clampRange(r: Range, limits: Range): Range {
  const span = Math.min(r.max - r.min, limits.max - limits.min);
  let min = r.min;
  if (min < limits.min) min = limits.min;
  if (min + span > limits.max) min = limits.max - span;
  return { min, max: min + span };
}
