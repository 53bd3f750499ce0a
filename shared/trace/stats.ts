/**
 * Robust statistics and running sums for the trace engine.
 *
 * Medians and the median absolute deviation (MAD) are the robust location and
 * spread estimates (F. R. Hampel, "The influence curve and its role in robust
 * estimation", J. Amer. Statist. Assoc. 69 (1974) 383); σ = 1.4826·MAD for
 * Gaussian noise. Order statistics use Hoare's quickselect (C. A. R. Hoare,
 * "Algorithm 65: Find", Comm. ACM 4 (1961) 321). Window means come from prefix
 * sums, so a window of any width costs two look-ups.
 */

/** σ of a Gaussian from its MAD: 1/Φ⁻¹(3/4). */
export const MAD_TO_SIGMA = 1.4826;

/** Median of values[from, to), from an evenly spaced sample of at most `maxPoints`. */
export function sampleMedian(values: ArrayLike<number>, from: number, to: number, maxPoints = 4001): number {
  const len = to - from;
  if (len <= 0) return NaN;
  const step = Math.max(1, Math.floor(len / maxPoints));
  const tmp = new Float64Array(Math.ceil(len / step));
  for (let i = from, j = 0; i < to; i += step, j++) tmp[j] = values[i];
  tmp.sort();
  const m = tmp.length >> 1;
  return tmp.length % 2 ? tmp[m] : (tmp[m - 1] + tmp[m]) / 2;
}

/** k-th smallest of a (reordered in place), by quickselect. */
/**
 * Level a stretch rests at: the mean of the samples within `halfWidth` of their median (every sample,
 * or a regular subsample of at most maxPoints). The median alone is robust to echoes but, on a recorder
 * whose noise is about a quantiser step or less, it sits on one of the recorder's levels, up to half a
 * step from the level the noise dithers about; the mean of the samples near it is not held to the
 * levels and still leaves out the echoes that stand clear of the noise.
 */
export function restingLevel(values: ArrayLike<number>, from: number, to: number, halfWidth: number, maxPoints = 4001): number {
  const med = sampleMedian(values, from, to, maxPoints);
  if (!(halfWidth > 0) || !Number.isFinite(med)) return med;
  const step = Math.max(1, Math.floor((to - from) / maxPoints));
  let sum = 0;
  let count = 0;
  for (let i = from; i < to; i += step) {
    const v = values[i];
    if (Math.abs(v - med) <= halfWidth) {
      sum += v;
      count++;
    }
  }
  return count > 0 ? sum / count : med;
}

export function select(a: Float64Array, k: number): number {
  let lo = 0;
  let hi = a.length - 1;
  while (lo < hi) {
    const pivot = a[(lo + hi) >> 1];
    let i = lo;
    let j = hi;
    while (i <= j) {
      while (a[i] < pivot) i++;
      while (a[j] > pivot) j--;
      if (i <= j) {
        const t = a[i];
        a[i] = a[j];
        a[j] = t;
        i++;
        j--;
      }
    }
    if (k <= j) hi = j;
    else if (k >= i) lo = i;
    else return a[k];
  }
  return a[k];
}

/** Robust σ (1.4826·MAD) of values[from, to), from an evenly spaced sample of at most 8001. */
export function madSigma(values: ArrayLike<number>, from: number, to: number): number {
  const len = to - from;
  if (len <= 1) return 0;
  const step = Math.max(1, Math.floor(len / 8001));
  const tmp = new Float64Array(Math.ceil(len / step));
  for (let i = from, j = 0; i < to; i += step, j++) tmp[j] = values[i];
  const mid = tmp.length >> 1;
  const med = select(tmp, mid);
  for (let k = 0; k < tmp.length; k++) tmp[k] = Math.abs(tmp[k] - med);
  return MAD_TO_SIGMA * select(tmp, mid);
}

/**
 * Robust σ of values[from, to) that holds when more than half of them are signal standing far
 * out of the noise (where the plain MAD breaks down): 1.4826·MAD, then again over the values
 * within 3σ of the median, until no more are left out
 * (iterative κσ clipping with κ = 3, as used to measure a sky background under the sources on
 * it, E. Bertin and S. Arnouts, Astron. Astrophys. Suppl. 117 (1996) 393; from memory). On
 * Gaussian noise alone a 3σ clip leaves out 0.3 % of it and lowers σ by well under 1 %.
 */
export function clippedMadSigma(values: ArrayLike<number>, from: number, to: number, minKept = 8): number {
  let kept = Float64Array.from({ length: Math.max(0, to - from) }, (_, k) => values[from + k]);
  let sigma = madSigma(kept, 0, kept.length);
  for (let iter = 0; iter < 20 && sigma > 0; iter++) {
    const tmp = Float64Array.from(kept);
    const med = select(tmp, tmp.length >> 1);
    const next = kept.filter((v) => Math.abs(v - med) <= 3 * sigma);
    if (next.length === kept.length || next.length < minKept) break;
    kept = next;
    sigma = madSigma(kept, 0, kept.length);
  }
  return sigma;
}

/** Evenly spaced sample of up to 4001 values, sorted, for percentiles of a long trace. */
export function sortedSample(values: ArrayLike<number>): Float64Array {
  const n = values.length;
  const step = Math.max(1, Math.floor(n / 4001));
  const tmp = new Float64Array(Math.ceil(n / step));
  for (let i = 0, j = 0; i < n; i += step, j++) tmp[j] = values[i];
  return tmp.sort();
}

export function percentileOf(sorted: Float64Array, p: number): number {
  return sorted[Math.min(sorted.length - 1, Math.max(0, Math.round(p * (sorted.length - 1))))];
}

/**
 * Centred moving average of width w (shrinking at the ends). The window at i
 * is [i − ⌊w/2⌋, i − ⌊w/2⌋ + w) clipped to the record; the running sum adds
 * the sample entering before it drops the one leaving, in the same order at
 * every i, so the three stretches below (the window cut by the start, whole,
 * cut by the end) give the same sums as one loop checking both ends each time.
 */
export function boxcar(x: Float64Array, w: number): Float64Array {
  if (w <= 1) return x;
  const n = x.length;
  const out = new Float64Array(n);
  const h = Math.floor(w / 2);
  let acc = 0;
  let count = 0;
  let lo = 0;
  let hi = 0;
  // While the window's start is clipped at 0 (i ≤ h), or its end at n: add only.
  const headEnd = Math.min(n, h + 1);
  let i = 0;
  for (; i < headEnd; i++) {
    const b = Math.min(n, i - h + w);
    while (hi < b) {
      acc += x[hi++];
      count++;
    }
    out[i] = acc / count;
  }
  // Whole windows: one sample in at i − h + w − 1, one out at i − h − 1 (count stays w).
  const midEnd = Math.max(i, n + h - w + 1);
  for (; i < midEnd; i++) {
    acc += x[i - h + w - 1];
    acc -= x[i - h - 1];
    out[i] = acc / count;
  }
  hi = Math.min(n, i - h - 1 + w);
  lo = i - h - 1;
  for (; i < n; i++) {
    const a = Math.max(0, i - h);
    const b = Math.min(n, i - h + w);
    while (hi < b) {
      acc += x[hi++];
      count++;
    }
    while (lo < a) {
      acc -= x[lo++];
      count--;
    }
    out[i] = acc / count;
  }
  return out;
}

/** p[i] = x[0] + … + x[i−1]; the mean of x[a, b) is (p[b] − p[a])/(b − a). */
export function prefixSums(x: Float64Array, into?: Float64Array): Float64Array {
  // Into the caller's buffer when it has room (a view of exactly x.length + 1 values).
  const p = into && into.length >= x.length + 1 ? into.subarray(0, x.length + 1) : new Float64Array(x.length + 1);
  p[0] = 0;
  let acc = 0;
  for (let i = 0; i < x.length; i++) {
    acc += x[i];
    p[i + 1] = acc;
  }
  return p;
}

/** Least-squares line over [from, to) of x, returned as a function of index. */
export function lineFit(x: Float64Array, from: number, to: number): (i: number) => number {
  const n = to - from;
  if (n <= 0) return () => 0;
  if (n < 3) {
    const m = (x[from] + x[to - 1]) / 2;
    return () => m;
  }
  let sx = 0;
  let sy = 0;
  let sxx = 0;
  let sxy = 0;
  for (let i = from; i < to; i++) {
    const k = i - from;
    sx += k;
    sy += x[i];
    sxx += k * k;
    sxy += k * x[i];
  }
  const den = n * sxx - sx * sx;
  const slope = den > 0 ? (n * sxy - sx * sy) / den : 0;
  const icpt = (sy - slope * sx) / n;
  return (i) => icpt + slope * (i - from);
}

/**
 * x with P(Z > x) = p for a standard normal Z, 0 < p ≤ 0.5: the rational approximation
 * of M. Abramowitz and I. A. Stegun, "Handbook of Mathematical Functions" (1964),
 * 26.2.23, |error| < 4.5·10⁻⁴.
 */
export function normalUpperQuantile(p: number): number {
  const q = Math.min(0.5, Math.max(1e-300, p));
  const t = Math.sqrt(-2 * Math.log(q));
  return t - (2.515517 + 0.802853 * t + 0.010328 * t * t) / (1 + 1.432788 * t + 0.189269 * t * t + 0.001308 * t * t * t);
}
