/**
 * Detection: where the working signal steps.
 *
 * A four-window step filter F = (A − 3B + 3C − D)/2 over adjacent windows of w
 * samples, evaluated at scales w, 3w, 9w, … (a multi-scale edge detector in
 * the sense of S. Mallat and S. Zhong, "Characterization of signals from
 * multiscale edges", IEEE Trans. PAMI 14 (1992) 710). It returns the step
 * height for a step and zero for any constant, linear or quadratic baseline,
 * so the slow creep of a lossy line and DC drift do not raise events; at the
 * coarse scales its windows match the slow, loss-spread edges of far events. In a
 * pulse record the scale 2w is added: an echo's ramp in the running sum is the pulse's
 * whole width, twice the finest window, which reads only the ramp's two corners.
 * Within two windows of the record's end, where the four windows do not fit, a
 * three-window filter C − 2B + A (zero for a linear baseline) takes over, so an
 * edge the record cuts short is still seen; the coarsest scale may be one where only
 * that filter fits (three windows), with its noise carried over from the finer scale.
 *
 * The threshold is set for a stated rate of false events per trace from noise
 * (by default 1 in 100): each scale contributes about 2L/w independent outputs
 * over a search length L, and with N outputs in all each is held to a two-sided
 * Gaussian tail of rate/N, k = Φ⁻¹(1 − rate/2N) standard deviations (the
 * Bonferroni bound, e.g. R. G. Miller, "Simultaneous Statistical Inference",
 * 2nd ed., Springer 1981, ch. 1). The noise at each scale is measured on the
 * filter's own output (robust 1.4826·MAD, Hampel 1974, of differences four
 * windows apart, where the creep of a lossy line cancels; in a pulse record, up to
 * twice the pulse's width, iteratively 3σ-clipped as the record's noise measure is,
 * since there echoes can fill most of those differences), so coloured noise is
 * met at the scale it acts on; it is never taken below what white noise of the
 * measured sample noise would give. Where a coarse recorder's levels show
 * through (the differences tie), the median sits on a tie and the spread is
 * read from their 90th percentile instead. At coarse scales, where the record holds
 * too few independent outputs for a robust spread, the ratio of measured to
 * white noise found at the finer scales is carried over. Where a scale holds too
 * few even for the differences (the coarsest), its noise is not measured at all;
 * there, in a pulse record, whose running sum builds slow noise up as a walk, the
 * spread a finer scale of few outputs still read counts too, when it is the
 * larger: a record whose slow noise already shows one scale finer is not taken as
 * quiet where it cannot be measured. The record-end filter's own scale (too long
 * for F anywhere) keeps the finer scales' measured level: its windows span most of
 * the record, and what it reads there is a broad echo still creeping at the
 * record's end, which also fills the finer scale of few outputs and would raise
 * its threshold against itself.
 */
import type { ReflectionEvent, TraceWarning } from '../schemas/trace-analysis';
import { touchesHeld } from './noise';
import { clippedMadSigma, madSigma, normalUpperQuantile, prefixSums, sampleMedian, select } from './stats';
import type { Candidate, Launch, Measured, WorkingSignal } from './steps';

/** Target rate of false events per trace, from noise. */
export const FALSE_EVENTS_PER_TRACE = 0.01;

export interface DetectionSettings {
  /** A fixed threshold in noise deviations; when absent, set from the false-event rate. */
  thresholdSigma?: number;
  falseEventsPerTrace: number;
  /** Smallest |ρ| reported. */
  rhoMin: number;
  /** A buffer of at least n + 1 values the prefix sums may be written into (its contents are overwritten). */
  scratch?: Float64Array;
}

export interface Detection {
  candidates: Candidate[];
  thresholdSigma: number;
  independentTests: number;
}

interface ScaleNoise {
  sigmaF: number;
  /** Measured over white-noise level, when measured on enough outputs. */
  excess: number | null;
  /** Where too few outputs were measured for that but the spread was still read (pulse records), its level over white noise. */
  heldExcess?: number;
}

/**
 * Level of F at scale w for the record's noise: white noise of the measured σ, times its
 * coloured excess there. On white noise F's weights give √5·σ/√w (step); on the running sum
 * of white noise (a pulse record's u) they give 0.82·σ·√w, from the same weights summed over
 * the walk's increments.
 */
function whiteNoiseOfF(w: number, sig: WorkingSignal): number {
  const white = sig.mode === 'step' ? (2.24 * sig.sigmaU) / Math.sqrt(w) : 0.82 * sig.scaleForPulse * Math.sqrt(w);
  return white * sig.noiseExcess(w);
}

/** The step filter at scale w from the prefix sums, centred on sample i. */
function stepFilterAt(P: Float64Array, i: number, w: number, inv: number): number {
  return (-P[i - 2 * w] + 4 * P[i - w] - 6 * P[i] + 4 * P[i + w] - P[i + 2 * w]) * inv;
}

/**
 * Robust noise of F at one scale (see the header); F's k-th output (k < count) is centred on from + k·stride.
 * `excess`: the finer scales' measured level over white noise; `guess`: the level taken where this scale's
 * noise cannot be measured at all (at least `excess`).
 */
function filterNoise(
  P: Float64Array,
  from: number,
  count: number,
  w: number,
  stride: number,
  sig: WorkingSignal,
  excess: number,
  guess = excess,
): ScaleNoise {
  const white = Math.max(whiteNoiseOfF(w, sig), 1e-12);
  const lag = Math.max(1, Math.round((4 * w) / stride));
  const inv = 1 / (2 * w);
  let measured = 0;
  let used = count;
  if (count > lag + 8) {
    const m = count - lag;
    const step = Math.max(1, Math.floor(m / 4001));
    const dF = new Float64Array(Math.ceil(m / step));
    // Pairs whose windows touch a stretch held at the recorder's limit are left out: it holds no noise.
    const held = sig.held;
    let j = 0;
    for (let k = 0; k < m; k += step) {
      if (held !== null && touchesHeld(held, from + k * stride - 2 * w, from + (k + lag) * stride + 2 * w)) continue;
      dF[j++] = stepFilterAt(P, from + k * stride, w, inv) - stepFilterAt(P, from + (k + lag) * stride, w, inv);
    }
    if (held !== null) used = Math.round((j / dF.length) * count);
    // Up to twice a pulse's width a short cable's record is mostly launch and echoes, and so are
    // more than half of these differences: the plain MAD breaks down there and reads them as noise.
    if (j >= 8) measured = (w <= sig.clipNoiseUpTo ? clippedMadSigma(dF, 0, j) : madSigma(dF, 0, j)) / Math.SQRT2;
    if (j >= 8) measured = Math.max(measured, quantisedSpread(dF.subarray(0, j)));
  } else {
    const all = new Float64Array(count);
    for (let k = 0; k < count; k++) all[k] = stepFilterAt(P, from + k * stride, w, inv);
    measured = madSigma(all, 0, count);
  }
  // Enough independent outputs (twelve lags' worth) for the robust spread to hold.
  if (used >= 12 * lag) return { sigmaF: Math.max(measured, white), excess: Math.max(1, measured / white) };
  if (count <= lag + 8) return { sigmaF: Math.max(white, Math.min(measured, 3 * guess * white)), excess: null };
  const sigmaF = Math.max(white, Math.min(measured, 3 * excess * white));
  return sig.mode === 'pulse' ? { sigmaF, excess: null, heldExcess: sigmaF / white } : { sigmaF, excess: null };
}

/**
 * Where the recorder's quantiser shows through the filter (its output differences take fewer distinct
 * values than half their number), the median of |dF| sits on a tie and understates the spread (the
 * MAD's implosion on discrete data: P. J. Rousseeuw and C. Croux, "Alternatives to the median absolute
 * deviation", JASA 88 (1993) 1273): σ is then read from the 90th percentile of |dF| (1.645σ for Gaussian
 * noise, past the ties). 0 where the outputs are continuous. Reorders `dF`.
 */
function quantisedSpread(dF: Float64Array): number {
  const n = dF.length;
  dF.sort();
  // Equal up to the rounding of the running sums the filter is read from.
  const eps = 1e-9 * Math.max(Math.abs(dF[0]), Math.abs(dF[n - 1]));
  let distinct = 1;
  for (let k = 1; k < n; k++) if (dF[k] - dF[k - 1] > eps) distinct++;
  if (distinct >= 0.5 * n) return 0;
  for (let k = 0; k < n; k++) dF[k] = Math.abs(dF[k]);
  return select(dF, Math.floor(0.9 * (n - 1))) / 1.645 / Math.SQRT2;
}

/**
 * Extreme of each run of |F| above thr, where F is the step filter at scale w read from the
 * prefix sums at positions from + k·stride, k < count: computed as it is scanned, never stored.
 */
function filterRunsAbove(
  P: Float64Array,
  count: number,
  from: number,
  stride: number,
  w: number,
  thr: number,
  sigmaF: number,
): Candidate[] {
  const candidates: Candidate[] = [];
  const inv = 1 / (2 * w);
  let runStart = -1;
  let runSign = 0;
  let best = -1;
  let bestAbs = 0;
  let bestF = 0;
  for (let k = 0, i = from; k < count; k++, i += stride) {
    const v = stepFilterAt(P, i, w, inv);
    const a = v < 0 ? -v : v;
    if (a > thr) {
      const sg = v < 0 ? -1 : 1;
      if (runStart < 0 || sg !== runSign) {
        if (best >= 0) candidates.push({ i: from + best * stride, w, sign: runSign, f: bestF, snr: bestAbs / sigmaF });
        best = -1;
        bestAbs = 0;
        runStart = k;
        runSign = sg;
      }
      if (a > bestAbs) {
        bestAbs = a;
        best = k;
        bestF = v;
      }
    } else if (runStart >= 0) {
      if (best >= 0) candidates.push({ i: from + best * stride, w, sign: runSign, f: bestF, snr: bestAbs / sigmaF });
      best = -1;
      bestAbs = 0;
      runStart = -1;
    }
  }
  if (best >= 0) candidates.push({ i: from + best * stride, w, sign: runSign, f: bestF, snr: bestAbs / sigmaF });
  return candidates;
}

/** Extreme of each run of |F| above thr, as candidates at positions from + k·stride. */
function runsAbove(
  F: Float64Array,
  count: number,
  from: number,
  stride: number,
  w: number,
  thr: number,
  sigmaF: number,
): Candidate[] {
  const candidates: Candidate[] = [];
  let runStart = -1;
  let runSign = 0;
  let best = -1;
  let bestAbs = 0;
  const flush = () => {
    if (best >= 0) candidates.push({ i: from + best * stride, w, sign: runSign, f: F[best], snr: bestAbs / sigmaF });
    best = -1;
    bestAbs = 0;
    runStart = -1;
  };
  for (let k = 0; k < count; k++) {
    const v = F[k];
    const a = v < 0 ? -v : v;
    if (a > thr) {
      const sg = v < 0 ? -1 : 1;
      if (runStart < 0 || sg !== runSign) {
        flush();
        runStart = k;
        runSign = sg;
      }
      if (a > bestAbs) {
        bestAbs = a;
        best = k;
      }
    } else if (runStart >= 0) flush();
  }
  flush();
  return candidates;
}

interface ScaleResult {
  candidates: Candidate[];
  thr: number;
  excess: number | null;
  heldExcess?: number;
}

/** The filter at scale w, its threshold, and the extreme of each run above it. */
function filterScale(
  P: Float64Array,
  w: number,
  sig: WorkingSignal,
  k: number,
  rhoMin: number,
  excess: number,
  floorF = rhoMin,
  guess = excess,
): ScaleResult | null {
  const n = P.length - 1;
  const from = sig.start + 2 * w;
  const to = n - 2 * w;
  if (to <= from) return tailOnlyScale(P, w, sig, k, rhoMin, excess);
  // Coarse scales change slowly; a stride of w/4 keeps their peaks and saves most of the work.
  const stride = Math.max(1, Math.floor(w / 4));
  const count = Math.floor((to - 1 - from) / stride) + 1;
  // (A − 3B + 3C − D)/2 over window means, written on the prefix sums; read where needed, not stored.
  const noise = filterNoise(P, from, count, w, stride, sig, excess, guess);
  const thr = Math.max(k * noise.sigmaF, floorF);
  const candidates = filterRunsAbove(P, count, from, stride, w, thr, noise.sigmaF);
  // The record's last two windows: C − 2B + A, with noise √6/√5 that of F for white noise.
  const tailFrom = Math.max(from, to);
  const tailCount = Math.floor((n - w - tailFrom) / stride);
  if (tailCount > 0) {
    const T = new Float64Array(tailCount);
    const invW = 1 / w;
    for (let j = 0, i = tailFrom; j < tailCount; j++, i += stride)
      T[j] = (P[i + w] - 3 * P[i] + 3 * P[i - w] - P[i - 2 * w]) * invW;
    const sigmaT = noise.sigmaF * Math.sqrt(6 / 5);
    candidates.push(...runsAbove(T, tailCount, tailFrom, stride, w, Math.max(k * sigmaT, rhoMin), sigmaT));
  }
  return { candidates, thr, excess: noise.excess, heldExcess: noise.heldExcess };
}

/**
 * A scale whose four windows no longer fit the search but three do: only the record-end filter
 * C − 2B + A runs, so an edge spread over more than the finer windows and cut short by the
 * record's end (a short cable's far echo) is still seen. Its noise cannot be measured there, so
 * it is carried over from the finer scale (white noise of the measured σ times the excess found
 * there) and taken three times over: noise as slow as a random walk raises the excess in
 * proportion to the scale, three times from one scale to the next.
 */
function tailOnlyScale(P: Float64Array, w: number, sig: WorkingSignal, k: number, rhoMin: number, excess: number): ScaleResult | null {
  const n = P.length - 1;
  const from = sig.start + 2 * w;
  const stride = Math.max(1, Math.floor(w / 4));
  if (n - w < from) return null;
  const count = Math.floor((n - w - from) / stride) + 1;
  const T = new Float64Array(count);
  const invW = 1 / w;
  for (let j = 0, i = from; j < count; j++, i += stride) T[j] = (P[i + w] - 3 * P[i] + 3 * P[i - w] - P[i - 2 * w]) * invW;
  const sigmaT = 3 * Math.max(whiteNoiseOfF(w, sig), 1e-12) * Math.max(1, excess) * Math.sqrt(6 / 5);
  const thr = Math.max(k * sigmaT, rhoMin);
  return { candidates: runsAbove(T, count, from, stride, w, thr, sigmaT), thr, excess: null };
}

/**
 * Drop side lobes: a step gives −½ of its height at ±w on the same scale, and the level across it moves against F.
 * `pulse`: the working signal is a pulse record's running sum (see the lobe test below).
 */
function dropSideLobes(
  candidates: Candidate[],
  P: Float64Array,
  thrOf: Map<number, number>,
  rhoMin: number,
  pulse: boolean,
): Candidate[] {
  const n = P.length - 1;
  const mean = (a: number, b: number) => (P[b] - P[a]) / (b - a);
  const byScale = new Map<number, Candidate[]>();
  for (const c of candidates) {
    const list = byScale.get(c.w) ?? [];
    list.push(c);
    byScale.set(c.w, list);
  }
  // c, against the stronger m beside it, is the lobe of one edge when the level moves across the two of
  // them, from before the first to after the second, by more than m's own response: a real step against
  // m would take its height off that move, and add to m's response (F's lobe, −½ of a step at ±w, is
  // against c's sign at m), while one spread edge moves the level by its whole height and its response
  // at any point is less than that.
  const spreadEdgeLobe = (c: Candidate, m: Candidate) => {
    const w = c.w;
    const first = Math.min(c.i, m.i);
    const last = Math.max(c.i, m.i);
    if (first - 2 * w < 0 || last + 2 * w > n) return false;
    const net = mean(last + w, last + 2 * w) - mean(first - 2 * w, first - w);
    return Math.sign(net) === m.sign && Math.abs(net) > Math.abs(m.f) + (thrOf.get(w) ?? rhoMin);
  };
  const kept: Candidate[] = [];
  // Coarsest scale first, so a lobe's exemption below can see what the coarser scales kept.
  const scales = [...byScale.keys()].sort((x, y) => y - x);
  for (const w of scales) {
    const list = byScale.get(w)!;
    const keptCoarser = kept.length;
    for (const c of list) {
      const lobe = list.some(
        (m) =>
          m !== c &&
          m.sign !== c.sign &&
          Math.abs(m.i - c.i) <= 2 * w &&
          (Math.abs(m.f) > 1.6 * Math.abs(c.f) || (Math.abs(m.f) > Math.abs(c.f) && spreadEdgeLobe(c, m))),
      );
      const before = mean(Math.max(0, c.i - 2 * w), Math.max(1, c.i - w));
      const after = mean(Math.min(n - 1, c.i + w), Math.min(n, c.i + 2 * w));
      const net = after - before;
      const thr = thrOf.get(w) ?? rhoMin;
      const against = Math.sign(net) === -c.sign && Math.abs(net) > thr;
      // A lobe leaves the level where it was or moves it the larger edge's way. In a pulse record
      // an echo is a ramp in u as long as the pulse, which a window shorter than that reads at a
      // fraction of its height (F vanishes on a straight stretch): where the level across c moves
      // c's own way by more than twice what F reads there, c is an echo of its own beside a larger
      // one of the other sign, not its lobe, unless the next coarser scales (up to three times
      // this one, which span a ramp 2.5 windows long) already hold it within a window of their
      // own. (A step record's level also creeps after a lossy edge, so there the test is not made.)
      const moves =
        lobe &&
        pulse &&
        Math.sign(net) === c.sign &&
        Math.abs(net) > Math.max(thr, 2 * Math.abs(c.f)) &&
        !kept.slice(0, keptCoarser).some((o) => o.w <= 3 * w && o.sign === c.sign && Math.abs(o.i - c.i) < o.w);
      if ((!lobe || moves) && !against) kept.push(c);
    }
  }
  return kept;
}

/**
 * Drop the fine-scale lobes of a coarse edge. An edge spread over many finer windows (a loss-spread echo)
 * is seen whole only at a coarse scale; a finer filter reads its curvature, which turns sign at the edge's
 * flanks, and finer scales are kept first (resolveScales). A finer candidate c is such a lobe when all hold:
 * - a coarser candidate m of the other sign, stronger than c, lies within one of m's windows of it (the span
 *   of m's flanks);
 * - m is spread at c's scale: the finer filter answers it nowhere there with half its height (a step shorter
 *   than the window gets F = its whole height at every scale);
 * - the level across c on its own scale moves by less than c's response: a step of height h gives F = h and
 *   moves the level from the windows before it to those after it by h, while a flank's curvature answers F
 *   with no such move of its own.
 */
function dropCoarseEdgeLobes(kept: Candidate[], P: Float64Array): Candidate[] {
  const n = P.length - 1;
  const mean = (a: number, b: number) => (P[b] - P[a]) / (b - a);
  // The finer filter's strongest answer, of m's sign, within one coarser window of m.
  const peakAt = (m: Candidate, w: number) => {
    const inv = 1 / (2 * w);
    const step = Math.max(1, Math.floor(w / 4));
    let peak = -Infinity;
    for (let i = Math.max(2 * w, m.i - m.w); i <= Math.min(n - 2 * w, m.i + m.w); i += step) peak = Math.max(peak, m.sign * stepFilterAt(P, i, w, inv));
    return peak;
  };
  return kept.filter((c) => {
    const w = c.w;
    const before = mean(Math.max(0, c.i - 2 * w), Math.max(1, c.i - w));
    const after = mean(Math.min(n - 1, c.i + w), Math.min(n, c.i + 2 * w));
    const own = (after - before) * c.sign;
    if (own >= Math.abs(c.f)) return true;
    return !kept.some(
      (m) =>
        m.w >= 3 * w &&
        m.sign !== c.sign &&
        Math.abs(m.i - c.i) <= m.w &&
        Math.abs(m.f) > Math.abs(c.f) &&
        peakAt(m, w) < 0.5 * Math.abs(m.f),
    );
  });
}

/** Finer scales first; a coarser detection only adds an event where no finer one lies. */
function resolveScales(kept: Candidate[]): Candidate[] {
  kept.sort((a, b) => a.w - b.w || b.snr - a.snr);
  const accepted: Candidate[] = [];
  for (const c of kept) {
    const clash = accepted.some((a) => Math.abs(a.i - c.i) < 2 * Math.max(a.w, c.w) && (a.sign === c.sign || a.w < c.w));
    if (!clash) accepted.push(c);
  }
  return accepted.sort((a, b) => a.i - b.i);
}

/**
 * Largest |F| that a unit edge rising linearly over `ramp` samples gives at scale w (F reads a
 * step shorter than its window whole, a ramp over several windows only at its two corners:
 * 0.14 of its height for a ramp 2.5 windows long). Computed on a model of 32 samples a window.
 */
export function rampResponse(ramp: number, w: number): number {
  const W = 32;
  const R = Math.max(1, Math.round(Math.min(ramp / w, 32) * W));
  const n = 4 * W + R + 4 * W;
  const P = new Float64Array(n + 1);
  for (let i = 0, acc = 0; i < n; i++) {
    acc += Math.min(1, Math.max(0, (i - 4 * W + 1) / R));
    P[i + 1] = acc;
  }
  const inv = 1 / (2 * W);
  let best = 0;
  for (let i = 2 * W; i <= n - 2 * W; i++) best = Math.max(best, Math.abs(stepFilterAt(P, i, W, inv)));
  return best;
}

/**
 * The filter's scales: w0, 3w0, 9w0, … while four windows fit the search (at most twelve, so a
 * record whose finest scale is a couple of samples still reaches edges spread over thousands).
 */
function scalesOf(sig: WorkingSignal): number[] {
  const searchLen = sig.u.length - sig.start;
  const scales: number[] = [];
  // Four windows for the step filter; the last scale may fit only three (the record-end filter).
  for (let w = sig.w0; 3 * w <= searchLen && scales.length < 12; w *= 3) scales.push(w);
  // A pulse echo's ramp in the running sum is its whole width, twice the finest window: that
  // scale too, where the finest reads only the ramp's two corners.
  if (sig.mode === 'pulse' && 4 * 2 * sig.w0 <= searchLen) scales.splice(1, 0, 2 * sig.w0);
  if (scales.length === 0) scales.push(Math.max(1, Math.floor(searchLen / 4)));
  return scales;
}

/** Longest launch template matched sample by sample (longer pulses are met by the step filter's coarse scales). */
const MATCHED_MAX_TEMPLATE = 64;

interface MatchedOutput {
  /** M[i]: the record at i read as an echo of the launch centred there, in launch peaks (0 outside the search). */
  m: Float64Array;
  from: number;
  to: number;
  sigma: number;
  /** The template's length in samples. */
  span: number;
  /** Independent outputs: one per launch width at half height. */
  independent: number;
}

/**
 * A pulse record matched against its own launch (North's matched filter, the detector of a known shape
 * in white noise with the highest signal-to-noise ratio; D. O. North, Proc. IEEE 51 (1963) 1016): each
 * output is the least-squares height of a launch-shaped echo centred there, Σ t·y / Σ t². Where the
 * launch is only a few samples wide the step filter's finest windows, four pulse widths long on the
 * running sum, take in several times the noise a short echo rises above; this reads it over the echo's
 * own extent. The noise of M is measured on M itself (3σ-clipped, so coloured noise and the echoes
 * count as they are) and never read below white noise through the template.
 */
function matchedFilter(sig: WorkingSignal): MatchedOutput | null {
  const t = sig.pulseTemplate;
  if (sig.mode !== 'pulse' || t === null || t.length > MATCHED_MAX_TEMPLATE) return null;
  let energy = 0;
  let moment = 0;
  let mass = 0;
  let peak = 0;
  for (let j = 0; j < t.length; j++) {
    energy += t[j] * t[j];
    if (t[j] > 0) {
      moment += j * t[j];
      mass += t[j];
    }
    peak = Math.max(peak, t[j]);
  }
  if (!(energy > 0) || !(mass > 0)) return null;
  let width = 0;
  for (let j = 0; j < t.length; j++) if (t[j] >= 0.5 * peak) width++;
  const c = Math.round(moment / mass);
  const raw = sig.pulseRaw;
  const n = raw.length;
  const from = sig.start + c;
  const to = n - (t.length - c);
  if (to - from < 2 * t.length) return null;
  const m = new Float64Array(n);
  for (let i = from; i < to; i++) {
    let acc = 0;
    const o = i - c;
    for (let j = 0; j < t.length; j++) acc += t[j] * raw[o + j];
    m[i] = acc / energy;
  }
  const stride = Math.max(1, Math.floor((to - from) / 20000));
  const sample = new Float64Array(Math.ceil((to - from) / stride));
  for (let i = from, j = 0; i < to; i += stride, j++) sample[j] = m[i];
  const white = sig.scaleForPulse * sig.unitArea * sig.noiseExcess(Math.max(1, width)) / Math.sqrt(energy);
  const sigma = Math.max(clippedMadSigma(sample, 0, sample.length), white);
  return { m, from, to, sigma, span: t.length, independent: Math.max(1, (to - from) / Math.max(1, width)) };
}

/**
 * An echo of the launch's shape gives a matched output that falls below half its peak within the
 * template's length on both sides (the template's own autocorrelation); a slower feature (the
 * loss-spread tail of a larger echo, creep, drift) holds it up for longer and is left to the step
 * filter's coarser scales.
 */
function compact(mo: MatchedOutput, p: number): boolean {
  const v = mo.m[p];
  const falls = (from: number, to: number, dir: number) => {
    for (let i = from; dir > 0 ? i <= to : i >= to; i += dir) {
      // The search's ends: the launch before it, the record's end after it; nothing to hold it up.
      if (i < mo.from || i >= mo.to) return true;
      if (mo.m[i] * Math.sign(v) < 0.5 * Math.abs(v)) return true;
    }
    return false;
  };
  return falls(p - 1, p - mo.span, -1) && falls(p + 1, p + mo.span, 1);
}

/**
 * Echoes the matched filter finds above the threshold that no step-filter candidate of the same sign
 * already stands for: the peak of each run above k·σ (and rhoMin), at the finest scale.
 */
function matchedCandidates(mo: MatchedOutput, found: readonly Candidate[], sig: WorkingSignal, k: number, rhoMin: number): Candidate[] {
  // A run of one quantiser level is no echo (dropQuantiserStairs): the height must pass a step and a half.
  const thr = Math.max(k * mo.sigma, rhoMin, 1.5 * sig.quantRaw);
  const out: Candidate[] = [];
  const w = sig.w0;
  let best = -1;
  for (let i = mo.from; i <= mo.to; i++) {
    const v = i < mo.to ? mo.m[i] : 0;
    const above = Math.abs(v) > thr;
    if (above && (best < 0 || Math.sign(v) === Math.sign(mo.m[best]))) {
      if (best < 0 || Math.abs(v) > Math.abs(mo.m[best])) best = i;
      continue;
    }
    if (best >= 0) {
      const sign = mo.m[best] > 0 ? 1 : -1;
      const near = found.some((c) => c.sign === sign && Math.abs(c.i - best) <= 2 * w + c.w);
      if (!near && compact(mo, best)) out.push({ i: best, w, sign, f: mo.m[best], snr: Math.abs(mo.m[best]) / mo.sigma, matched: true });
    }
    best = above ? i : -1;
  }
  return out;
}

/** Candidate events in the working signal, in time order, and the threshold that found them. */
export function detectEdges(sig: WorkingSignal, settings: DetectionSettings): Detection {
  const n = sig.u.length;
  const searchLen = n - sig.start;
  const scales = scalesOf(sig);
  // About two independent outputs per window length: F's kernel decorrelates within half a
  // window of lag (measured on noise-only records, tests/unit/trace/engine-steps.test.ts).
  const matched = matchedFilter(sig);
  const independentTests =
    scales.reduce((acc, w) => acc + Math.max(1, (2 * (searchLen - 3 * w)) / w), 0) + (matched?.independent ?? 0);
  const k = settings.thresholdSigma ?? normalUpperQuantile(settings.falseEventsPerTrace / (2 * independentTests));
  const rhoMin = settings.rhoMin;
  const P = prefixSums(sig.u, settings.scratch);
  const candidates: Candidate[] = [];
  const thresholds: number[] = [];
  let excess = 1;
  let held = 1;
  // A pulse record too short for the scale 2·w0 has no scale that reads an echo's ramp in the running
  // sum (the pulse's width, 2.5 w0) whole: the finest reads it at 0.14 of its height, so a floor of
  // rhoMin there keeps out echoes seven times larger. Its floor is then what an echo of rhoMin gives
  // it. (The fitted height is still held to rhoMin, edge-fit.ts; where the scale 2·w0 runs, the finest
  // keeps the plain floor, against which its fractional reading of large echoes' flanks is weighed.)
  const rampScaleMissing = sig.mode === 'pulse' && !scales.includes(2 * sig.w0);
  for (const w of scales) {
    // Only F's floor: the record-end filter reads an echo the record cuts short, at no known share of it.
    const floorF = rampScaleMissing && w === sig.w0 ? rhoMin * rampResponse(2.5 * sig.w0, w) : rhoMin;
    const r = filterScale(P, w, sig, k, rhoMin, excess, floorF, Math.max(excess, held));
    if (!r) continue;
    if (r.excess !== null) excess = r.excess;
    if (r.heldExcess !== undefined) held = Math.max(held, r.heldExcess);
    thresholds.push(r.thr);
    candidates.push(...r.candidates);
  }
  const thrOf = new Map(scales.map((w, j) => [w, thresholds[j] ?? rhoMin]));
  // Inside the blind zone the launch's own settling is still in the signal: keep only what
  // stands twice the threshold out of it.
  if (matched) candidates.push(...matchedCandidates(matched, candidates, sig, k, rhoMin));
  // A matched candidate's window starts past the launch's settling (the search's start): it is judged
  // on the threshold alone.
  const clear = candidates.filter((c) => c.matched === true || c.i - 2 * c.w >= sig.blindIdx || c.snr >= 2 * k);
  const kept = dropSideLobes(clear, P, thrOf, rhoMin, sig.mode === 'pulse');
  return { candidates: resolveScales(dropCoarseEdgeLobes(kept, P)), thresholdSigma: k, independentTests };
}

/** More events than this in one record means its threshold is wrong for it (see dropClutter). */
export const CLUTTER_EVENTS = 12;

/**
 * A record that yields more than a dozen events (after those past the cable's end are dropped)
 * is full of something its noise measure did not see (ringing, bursts of interference, spikes,
 * coloured noise the threshold was not set for): its events are then mostly that clutter, of
 * about one size. Keep only those standing at least twice the median event's signal-to-noise
 * ratio; the rest are read as the record's own clutter. The list is renumbered in place (and
 * the echoes of what is dropped go with it); returns the warning, if any.
 */
export function dropClutter(events: ReflectionEvent[]): TraceWarning[] {
  if (events.length <= CLUTTER_EVENTS) return [];
  // A signal-to-noise ratio of 0 stands for one that could not be measured (a noise-free record).
  const snrOf = (e: ReflectionEvent) => (e.snr > 0 ? e.snr : Infinity);
  const snrs = events.map(snrOf).sort((a, b) => a - b);
  const median = snrs[Math.floor(snrs.length / 2)];
  const dropped = new Set<number>();
  for (const e of events) {
    if (snrOf(e) < 2 * median || (e.likelyMultipleOf !== null && dropped.has(e.likelyMultipleOf))) dropped.add(e.index);
  }
  const kept = events.filter((e) => !dropped.has(e.index));
  const renumber = new Map(kept.map((e, k) => [e.index, k]));
  for (const e of kept) {
    e.index = renumber.get(e.index)!;
    if (e.likelyMultipleOf !== null) e.likelyMultipleOf = renumber.get(e.likelyMultipleOf) ?? null;
  }
  const total = events.length;
  events.splice(0, events.length, ...kept);
  return [
    {
      code: 'CLUTTER',
      message: `the record holds ${total} small features of about one size (ringing, interference or noise the threshold was not set for); ${dropped.size} of them are not reported, only those standing at least twice as far above the noise as the typical one`,
    },
  ];
}

/**
 * Drop edges no taller than a step and a half of the recorder's quantiser: where the noise is
 * below one step, a slow creep or drift crosses each level as a clean one-step stair, which is
 * no evidence of a reflection. A pulse echo's departure is read over its own span only: up to the
 * lead-in (two filter windows before the onset reading) of the next echo that begins past its end,
 * where the record already departs for that one, and never short of the launch pulse's own extent
 * (its width and two rises) from its onset. Without a launch (`L`) the span is the whole reading.
 * A step record's edge is kept where the record climbs more levels around it than its reading holds,
 * from a level it rested at (loneTransition); a pulse echo of one level, where that level is one the
 * record did not touch at rest and the echo holds it for about the launch's width (loneEcho).
 */
export function dropQuantiserStairs(measured: Measured[], sig: WorkingSignal, L?: Launch): Measured[] {
  if (sig.mode === 'pulse') {
    if (!(sig.quantRaw > 0)) return measured;
    // An echo lasts at the least the launch pulse's width and two rises, which its own span always keeps.
    const extent = L?.found ? (L.widthSamples ?? 0) + 2 * L.riseSamples : 0;
    return measured.filter((m) => {
      let until = Infinity;
      if (L?.found)
        for (const o of measured)
          if (o.onsetIdx >= m.endIdx) until = Math.min(until, Math.max(o.onsetIdx - 2 * o.w, m.onsetIdx + extent));
      return Math.abs(pulseExcursion(sig, m, until)) > 1.5 * sig.quantRaw || (L?.found === true && loneEcho(sig, m, L));
    });
  }
  if (!(sig.quantU > 0)) return measured;
  return measured.filter((m) => Math.abs(m.height) > 1.5 * sig.quantU || loneTransition(sig, m, measured));
}

/**
 * A step record's edge no taller than a step and a half that is still a reflection: the record rests at
 * one level (the same over two windows four windows apart, no other edge's reading among them), then,
 * within six of the edge's windows either side of its onset reading and before the next edge's lead-in,
 * departs from it by more than a step and a half, held over a whole window. A loss-spread echo on a
 * quiet recorder climbs several levels in one short run, of which the edge's reading may hold only one;
 * a creep crosses one level and rests there for many windows, and the tail of a larger edge before it
 * does not rest first.
 */
function loneTransition(sig: WorkingSignal, m: Measured, measured: Measured[]): boolean {
  const u = sig.u;
  const n = u.length;
  const w = Math.max(1, m.w);
  const onset = Math.floor(m.onsetIdx);
  const refTo = onset - 6 * w;
  const farFrom = refTo - 6 * w;
  if (farFrom < sig.start) return false;
  let next = n;
  for (const o of measured) {
    if (o === m) continue;
    if (o.onsetIdx < m.onsetIdx && o.endIdx > farFrom) return false;
    if (o.onsetIdx > m.onsetIdx) next = Math.min(next, Math.floor(o.onsetIdx - 2 * o.w));
  }
  const q = sig.quantU;
  const ref = sampleMedian(u, refTo - 2 * w, refTo);
  if (Math.abs(ref - sampleMedian(u, farFrom, farFrom + 2 * w)) >= 0.5 * q) return false;
  const to = Math.min(n, onset + 6 * w, next);
  const sign = Math.sign(m.height);
  let sum = 0;
  for (let i = refTo; i < refTo + w && i < to; i++) sum += u[i];
  for (let i = refTo + w; i <= to; i++) {
    if (sign * (sum / w - ref) > 1.5 * q) return true;
    if (i < to) sum += u[i] - u[i - w];
  }
  return false;
}

/**
 * A pulse record's echo of one level that is still a reflection: the record holds the neighbouring level,
 * on the echo's side, unbroken for three quarters of the launch's width or more (an echo has at least its
 * shape), after resting for two of the launch's extents (its width and two rises) with not one sample on
 * that level nor further than a level from it, and is back at its resting level within an extent after.
 * A rounding point the resting level lies near shows as samples of the neighbouring level beside it, and
 * drift or slow noise there makes its runs; an echo's run of a level the record never touched at rest
 * does not come from them.
 */
function loneEcho(sig: WorkingSignal, m: Measured, L: Launch): boolean {
  const width = L.widthSamples;
  if (width === null || !(width >= 2) || m.height === 0) return false;
  const raw = sig.pulseRaw;
  const n = raw.length;
  const q = sig.quantRaw;
  const extent = width + 2 * L.riseSamples;
  const onset = Math.max(0, Math.min(n - 1, Math.floor(m.onsetIdx)));
  const from = Math.max(0, onset - 2 * m.w);
  const ref = onset > from ? sampleMedian(raw, from, onset) : raw[onset];
  const level = ref + Math.sign(m.height) * q;
  const at = (i: number) => Math.abs(raw[i] - level) < 0.5 * q;
  // The longest unbroken run of the level from a launch width before the onset reading to two extents after it.
  let best = 0;
  let bestStart = -1;
  for (let i = Math.max(0, onset - width), run = 0; i < Math.min(n, onset + 2 * extent); i++) {
    run = at(i) ? run + 1 : 0;
    if (run > best) {
      best = run;
      bestStart = i - run + 1;
    }
  }
  if (best < 0.75 * width) return false;
  const restFrom = Math.floor(bestStart - 2 * extent);
  if (restFrom < sig.start) return false;
  for (let i = restFrom; i < bestStart; i++) if (at(i) || Math.abs(raw[i] - ref) > 1.5 * q) return false;
  const back = bestStart + best;
  const backTo = Math.min(n, Math.ceil(back + extent));
  return backTo > back && Math.abs(sampleMedian(raw, back, backTo) - ref) < 0.5 * q;
}

/**
 * Largest departure of a pulse record's raw trace, over an echo's span (ending at `until` where the next
 * echo's lead-in begins), from the level it rests at
 * just before the echo (the median over two windows before its onset), in launch peaks. An echo of a
 * quiet, coarse recorder that departs by no more than a level and a half is a run of the neighbouring
 * level, which drift or slow noise near a rounding point makes as well (see quantRaw).
 */
function pulseExcursion(sig: WorkingSignal, m: Measured, until = Infinity): number {
  const raw = sig.pulseRaw;
  const n = raw.length;
  const onset = Math.max(0, Math.min(n - 1, Math.floor(m.onsetIdx)));
  const from = Math.max(0, onset - 2 * m.w);
  const ref = onset > from ? sampleMedian(raw, from, onset) : raw[onset];
  const to = Math.min(n, Math.max(onset + 1, Math.ceil(Math.min(m.endIdx, until))));
  let peak = 0;
  for (let i = onset; i < to; i++) if (Math.abs(raw[i] - ref) > Math.abs(peak)) peak = raw[i] - ref;
  return peak;
}

/**
 * Is m the way back from the blip before it? An edge against the blip's excursion, no larger
 * than it, starting within two windows of the blip's end, that only brings the level back to
 * where it was before the blip (within half the edge): a loss-spread blip returns slowly, and
 * its tail, measured from inside the dip, reads as an edge of its own.
 */
function returnsFromBlip(blip: Measured, m: Measured): boolean {
  if (Math.sign(m.height) === Math.sign(blip.peakDev) || Math.abs(m.height) > Math.abs(blip.peakDev)) return false;
  if (m.onsetIdx - blip.endIdx > 2 * Math.max(blip.w, m.w)) return false;
  return Math.abs(m.levelBefore + m.height - blip.levelBefore) < 0.5 * Math.abs(m.height);
}

/**
 * Merge a pair of opposite steps closer than their own width into one blip (a
 * splice, a short section), and same-sign steps closer than a window into one.
 * In a pulse record two echoes are apart once they arrive more than one launch
 * edge apart (its width and two rise times): closer, they overlap into one blip.
 */
export function mergeEdges(measured: Measured[], w0: number, L: Launch): Measured[] {
  const merged: Measured[] = [];
  const pulseEdge = L.widthSamples !== null ? L.widthSamples + 2 * L.riseSamples : 0;
  for (const m of measured) {
    const last = merged[merged.length - 1];
    if (last && last.blip && returnsFromBlip(last, m)) {
      last.endIdx = m.endIdx;
      continue;
    }
    if (
      last &&
      Math.sign(last.height) !== Math.sign(m.height) &&
      m.onsetIdx - last.onsetIdx < Math.max(1.5 * Math.max(last.w, m.w), 2 * w0, 1.5 * last.riseSamples, pulseEdge) &&
      Math.abs(last.height + m.height) < 0.75 * Math.abs(last.height)
    ) {
      last.blip = true;
      last.endIdx = m.endIdx;
      continue;
    }
    if (last && Math.sign(last.height) === Math.sign(m.height) && m.onsetIdx - last.onsetIdx < Math.max(last.w, m.w)) {
      last.height += m.height;
      if (last.heightRaw !== undefined || m.heightRaw !== undefined)
        last.heightRaw = (last.heightRaw ?? last.height - m.height) + (m.heightRaw ?? m.height);
      last.endIdx = m.endIdx;
      continue;
    }
    merged.push(m);
  }
  return merged;
}
