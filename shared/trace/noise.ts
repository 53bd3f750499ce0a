/**
 * Noise level of the raw record.
 *
 * σ from the first differences of the samples: an edge touches few differences,
 * so their robust spread (1.4826·MAD, Hampel 1974) over √2 is the white-noise σ
 * even on a trace full of steps. Below one ADC step the noise reads as zero;
 * the uniform rounding noise of a quantiser, q/√12 (B. Widrow and I. Kollár,
 * "Quantization Noise", Cambridge 2008, ch. 4), is then the floor, but only
 * when that step really is the recorder's: it recurs, or the samples sit on its
 * grid (a noise-free trace's few edges are neither).
 * Stretches held flat at the record's extreme (a saturated recorder) carry no
 * noise and are left out.
 */
import { clippedMadSigma, madSigma, prefixSums } from './stats';

/**
 * Is sample i inside a run of eight or more equal values at the record's maximum (hi) or
 * minimum (lo)? Asked only of the few samples the noise is read from, so no mask of the
 * whole record is built: the run is counted outwards from i, at most seven each way.
 */
function saturatedAt(y: Float64Array, i: number, hi: number, lo: number): boolean {
  const v = y[i];
  if (v !== hi && v !== lo) return false;
  let run = 1;
  for (let j = i - 1; j >= 0 && run < 8 && y[j] === v; j--) run++;
  for (let j = i + 1; j < y.length && run < 8 && y[j] === v; j++) run++;
  return run >= 8;
}

/**
 * Stretches held at the recorder's limit, as [start, end) sample pairs in order (runs of eight or
 * more equal values at the record's maximum or minimum), or null when there are none or when the
 * noise is below half a quantiser step. A stretch held flat carries no noise, so noise measured
 * at a scale leaves out whatever touches one. Noise of half a step or more keeps a sample on one
 * level with a chance of about 0.4, so eight in a row come by chance about once in 10⁴ runs (from
 * memory); on a quieter recorder a level held at the record's extreme is just the signal.
 */
export function heldStretches(y: Float64Array): Int32Array | null {
  // The record's extremes come with its noise (one pass over it for both).
  const { sigma0, q, lo, hi } = noiseAndStep(y);
  if (!(sigma0 > 0.5 * q)) return null;
  const n = y.length;
  const runs: number[] = [];
  for (let i = 0; i < n; ) {
    const v = y[i];
    // A sample off the extremes starts no held run (and the one after it starts a run of its own).
    if (v !== hi && v !== lo) {
      i++;
      continue;
    }
    let j = i + 1;
    while (j < n && y[j] === v) j++;
    if (j - i >= 8) runs.push(i, j);
    i = j;
  }
  return runs.length > 0 ? Int32Array.from(runs) : null;
}

/** Does [a, b) touch one of the held stretches (from heldStretches)? A binary search. */
export function touchesHeld(held: Int32Array | null, a: number, b: number): boolean {
  if (held === null) return false;
  // The first stretch that ends after a.
  let lo = 0;
  let hi = held.length / 2;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (held[2 * mid + 1] <= a) lo = mid + 1;
    else hi = mid;
  }
  return lo < held.length / 2 && held[2 * lo] < b;
}

/** Do (nearly) all samples lie on a grid of step q, using at least eight of its levels, as an ADC's output does? */
function onGrid(y: Float64Array, q: number, tol = 1e-3): boolean {
  const n = y.length;
  const step = Math.max(1, Math.floor(n / 4001));
  let on = 0;
  let all = 0;
  const levels = new Set<number>();
  for (let i = 0; i < n; i += step, all++) {
    const r = (y[i] - y[0]) / q;
    if (Math.abs(r - Math.round(r)) < tol) {
      on++;
      levels.add(Math.round(r));
    }
  }
  return on >= 0.95 * all && levels.size >= 8;
}

export function estimateNoise(y: Float64Array): number {
  return noiseAndStep(y).sigma0;
}

/**
 * The recorder's quantiser step where it shows (it recurs among the differences, or the
 * samples sit on its grid), else 0.
 */
export function adcStep(y: Float64Array): number {
  return noiseAndStep(y).q;
}

/** Both are read from one pass; an analysis asks for each of the same record once. */
interface NoiseAndRange {
  sigma0: number;
  q: number;
  /** The record's smallest and largest sample. */
  lo: number;
  hi: number;
}

const measured = new WeakMap<Float64Array, NoiseAndRange>();

function noiseAndStep(y: Float64Array): NoiseAndRange {
  let r = measured.get(y);
  if (!r) {
    r = measureNoise(y);
    measured.set(y, r);
  }
  return r;
}

/** out[0] = the smallest of y, out[1] = the largest (±Infinity when empty); a loop of its own, so it stays optimised. */
function rangeInto(y: Float64Array, out: Float64Array): void {
  let hi = -Infinity;
  let lo = Infinity;
  for (let i = 0; i < y.length; i++) {
    if (y[i] > hi) hi = y[i];
    if (y[i] < lo) lo = y[i];
  }
  out[0] = lo;
  out[1] = hi;
}

function measureNoise(y: Float64Array): NoiseAndRange {
  const n = y.length;
  const range = new Float64Array(2);
  rangeInto(y, range);
  const lo = range[0];
  const hi = range[1];
  const diffStep = Math.max(1, Math.floor((n - 1) / 8001));
  const diffs = new Float64Array(Math.ceil((n - 1) / diffStep));
  let m = 0;
  let minStep = Infinity;
  for (let i = 1; i < n; i += diffStep) {
    if (saturatedAt(y, i, hi, lo) && saturatedAt(y, i - 1, hi, lo)) continue;
    const d = y[i] - y[i - 1];
    diffs[m++] = d;
    const a = Math.abs(d);
    if (a > 0 && a < minStep) minStep = a;
  }
  if (m < 2) return { sigma0: 0, q: 0, lo, hi };
  let sigma0 = madSigma(diffs, 0, m) / Math.SQRT2;
  let atStep = 0;
  for (let j = 0; j < m; j++) if (Math.abs(Math.abs(diffs[j]) - minStep) <= 1e-9 * minStep) atStep++;
  let q = 0;
  if (Number.isFinite(minStep) && (atStep >= Math.max(3, 0.002 * m) || onGrid(y, minStep))) q = minStep;
  else if (Number.isFinite(minStep)) {
    // A file written with a few significant digits in other units (ρ, say) rounds each level, so
    // its steps differ in the last digits: take the mean of the differences within 0.1 % of the
    // smallest as the step, and ask the samples to sit within 1 % of a step of its grid.
    let sum = 0;
    let near = 0;
    for (let j = 0; j < m; j++) {
      const a = Math.abs(diffs[j]);
      if (a > 0 && a <= 1.001 * minStep) {
        sum += a;
        near++;
      }
    }
    const qMean = near > 0 ? sum / near : minStep;
    if (near >= Math.max(3, 0.002 * m) && onGrid(y, qMean, 0.01)) q = qMean;
  }
  if (q > 0) sigma0 = Math.max(sigma0, q / Math.sqrt(12));
  return { sigma0, q, lo, hi };
}

/**
 * Noise including its slow (coloured) part: the largest robust spread of y[i] − y[i − lag]
 * over lags 1, 4, 16, 64 and 256, over √2. Differences over a longer lag see the low-frequency
 * noise a first difference misses; edges still touch few of them.
 */
export function estimateSlowNoise(y: Float64Array): number {
  const n = y.length;
  let worst = 0;
  for (const lag of [1, 4, 16, 64, 256]) {
    if (n <= lag + 16) break;
    const step = Math.max(1, Math.floor((n - lag) / 8001));
    const d = new Float64Array(Math.ceil((n - lag) / step));
    for (let i = lag, j = 0; i < n; i += step, j++) d[j] = y[i] - y[i - lag];
    worst = Math.max(worst, madSigma(d, 0, d.length) / Math.SQRT2);
  }
  return worst;
}

/**
 * How much the noise at a scale of w samples exceeds white noise of σ0: the robust spread
 * of second differences of b-sample block means (which cancel a baseline's slope, so a
 * lossy line's creep does not count), over their white-noise value √6·σ0/√b, for block
 * sizes b = 1, 2, 4, … while at least 48 blocks remain. Blocks that touch a stretch held at
 * the recorder's limit (`held`, from heldStretches) are left out: it has no noise to measure.
 * A scale beyond the largest block takes that block's factor. Always at least 1.
 * Up to blocks of `clipUpTo` samples the spread is clipped (clippedMadSigma): a pulse record
 * of a short cable is mostly launch and echoes at block sizes near the pulse's width, more
 * than half of its second differences, which the plain MAD cannot see past; where they fill so
 * much that even the clipped spread reads them, its factor rises faster than any noise up to a
 * random walk's can (in proportion to the block), and is held to that rise. Beyond that the
 * shapes that survive a second difference are the line's own slow creep, which the engine does
 * not model, and the plain spread keeps them in the noise.
 */
export function noiseExcess(
  y: Float64Array,
  sigma0: number,
  scratch?: Float64Array,
  held: Int32Array | null = null,
  clipUpTo = 0,
): (w: number) => number {
  const n = y.length;
  const sizes: number[] = [];
  const factors: number[] = [];
  if (sigma0 > 0) {
    // The prefix sums are needed only here: in the caller's scratch buffer when it gives one.
    const P = prefixSums(y, scratch);
    for (let b = 1; n / b >= 48; b *= 2) {
      const blocks = Math.floor(n / b);
      const step = Math.max(1, Math.floor((blocks - 2) / 4001));
      const d2 = new Float64Array(Math.ceil((blocks - 2) / step));
      let m = 0;
      for (let j = 1; j < blocks - 1; j += step) {
        if (held !== null && touchesHeld(held, (j - 1) * b, (j + 2) * b)) continue;
        const a = P[(j - 1) * b];
        const c = P[j * b];
        const d = P[(j + 1) * b];
        const e = P[(j + 2) * b];
        d2[m++] = (e - d - 2 * (d - c) + (c - a)) / b;
      }
      // Too few blocks left clear of the recorder's limit for a robust spread.
      if (held !== null && m < 46) break;
      sizes.push(b);
      const spread = b <= clipUpTo ? clippedMadSigma(d2, 0, m) : madSigma(d2, 0, m);
      const factor = Math.max(1, spread / ((Math.sqrt(6) * sigma0) / Math.sqrt(b)));
      // Noise no slower than a random walk raises the factor at most in proportion to the block:
      // twice from one block size to the next. Where the spread is clipped (the pulses' shapes fill
      // most blocks) a steeper rise is those shapes still showing through, not noise.
      factors.push(b <= clipUpTo && factors.length > 0 ? Math.min(factor, 2 * factors[factors.length - 1]) : factor);
    }
  }
  return (w) => {
    let f = 1;
    for (let k = 0; k < sizes.length && sizes[k] <= w; k++) f = factors[k];
    return f;
  };
}
