/**
 * Min/max decimation for drawing a long trace: each bucket keeps its lowest
 * and highest sample, in time order, so a one-sample spike stays visible at
 * any zoom (the usual envelope reduction for plotting; "common practice").
 */
export interface TracePoint {
  x: number;
  y: number;
}

export function decimateMinMax(x: Float64Array, y: Float64Array, buckets: number): TracePoint[] {
  const n = Math.min(x.length, y.length);
  if (n === 0) return [];
  const b = Math.max(1, Math.floor(buckets));
  if (n <= 2 * b) return Array.from({ length: n }, (_, i) => ({ x: x[i], y: y[i] }));
  const out: TracePoint[] = [];
  for (let k = 0; k < b; k++) {
    const from = Math.floor((k * n) / b);
    const to = Math.floor(((k + 1) * n) / b);
    let iMin = from;
    let iMax = from;
    for (let i = from + 1; i < to; i++) {
      if (y[i] < y[iMin]) iMin = i;
      if (y[i] > y[iMax]) iMax = i;
    }
    const first = Math.min(iMin, iMax);
    const second = Math.max(iMin, iMax);
    out.push({ x: x[first], y: y[first] });
    if (second !== first) out.push({ x: x[second], y: y[second] });
  }
  return out;
}
