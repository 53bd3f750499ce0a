/**
 * Launch: where the instrument's own edge or pulse is in the record, its
 * level, rise time and width, and whether the trace is a step or a pulse
 * record.
 *
 * The launch is the first excursion larger than a quarter of the trace's range
 * (0.2–99.8 % percentiles), timed from where it leaves the starting level, with
 * its 10–90 % rise time and 50 % width as in IEEE Std 181-2011 ("Transitions,
 * Pulses, and Related Waveforms"). Four shapes of record are told apart:
 *  - the launch edge or pulse inside the record, after a pre-trigger stretch;
 *  - a pulse record that starts during the launch (no pre-trigger, as distance
 *    exports that begin at 0 m are): the record opens far from the level it
 *    rests at for most of its length and falls back to it within a pulse; or,
 *    in volts, a launch filling much of the record falls back near 0 V and an
 *    echo follows that no step record could show there;
 *  - a step record that starts after the launch, at the incident level;
 *  - a ρ trace with no launch at all (time zero is the reference plane, as in
 *    VNA-derived step responses), unless it holds a launch pulse of about +1.
 * Step or pulse is decided from the whole record: a pulse falls back below half
 * its height and the record then rests near the pre-launch level; a step keeps
 * away from it (a fault near the instrument lowers the level but does not bring
 * it back to the baseline). A record that opens on the launch's edge holds no pre-launch level:
 * there the level it rests at stands in for it. A launch whose top is flat at the record's extreme
 * while its edge is still steep has been clipped by the recorder.
 */
import { adcStep, estimateNoise, estimateSlowNoise } from './noise';
import { boxcar, percentileOf, sampleMedian, sortedSample } from './stats';
import type { Launch, Mode, TraceRecord } from './steps';

/**
 * Three-point average at i, computed where needed rather than stored. A plain function, not a
 * closure made per call, so the loops that scan with it stay optimised from one call to the next.
 */
function ys3(y: Float64Array, i: number): number {
  const n = y.length;
  return i <= 0 || i >= n - 1 ? y[Math.min(n - 1, Math.max(0, i))] : (y[i - 1] + y[i] + y[i + 1]) / 3;
}

interface Levels {
  lo: number;
  hi: number;
  range: number;
  /** Level of the first few samples. */
  bStart: number;
  /** Level the record rests at over its last four fifths. */
  rest: number;
  zeroIdx: number;
  /** Smallest excursion read as the launch: a quarter of the range, raised to 5 σ of slow noise (at most 0.6 of the range). */
  launchMin: number;
  /** Noise, including its slow part. */
  noise: number;
}

/**
 * Offer v to `top`, the `held` largest values so far in ascending order (top[0] is the smallest
 * of them), keeping at most k; returns how many it holds now. A typed array and a count rather
 * than a growing list, so the scan that calls it stays optimised.
 */
function keepLargest(top: Float64Array, held: number, k: number, v: number): number {
  let c = held;
  if (c === k) {
    if (v <= top[0]) return c;
    for (let m = 1; m < c; m++) top[m - 1] = top[m];
    c--;
  }
  let j = c;
  while (j > 0 && top[j - 1] > v) {
    top[j] = top[j - 1];
    j--;
  }
  top[j] = v;
  return c + 1;
}

/**
 * The k-th smallest and k-th largest of the three-point averages of y, in one pass: the
 * running three-sample sum is kept as it goes, and a value touches the short lists only when
 * it beats their current k-th, which on a long record almost never happens.
 */
export function extremes(y: Float64Array, k: number): { lo: number; hi: number } {
  if (y.length === 0 || !(k >= 1)) return { lo: NaN, hi: NaN };
  const top = new Float64Array(k);
  const bottom = new Float64Array(k);
  scanExtremes(y, k, top, bottom);
  return { lo: -bottom[0], hi: top[0] };
}

/**
 * The scan behind extremes: top ends holding the k largest three-point averages, bottom the k
 * smallest negated (the first sample holds a place in both, so neither is empty). It returns
 * nothing, so the optimised loop leaves by a plain return and keeps its code from trace to trace.
 */
function scanExtremes(y: Float64Array, k: number, top: Float64Array, bottom: Float64Array): void {
  const n = y.length;
  let nTop = 0;
  let nBottom = 0;
  // The k-th largest value and the k-th smallest so far (±Infinity until k are held).
  let above = -Infinity;
  let below = Infinity;
  let v = y[0];
  for (let i = 0; i < n; i++) {
    if (i === n - 1) v = y[i];
    else if (i > 0) {
      v = (y[i - 1] + y[i] + y[i + 1]) / 3;
      if (!(v > above || v < below)) continue;
    }
    if (v > above || nTop < k) {
      nTop = keepLargest(top, nTop, k, v);
      above = nTop < k ? -Infinity : top[0];
    }
    if (v < below || nBottom < k) {
      nBottom = keepLargest(bottom, nBottom, k, -v);
      below = nBottom < k ? Infinity : -bottom[0];
    }
  }
}

function recordLevels(rec: TraceRecord, slowNoise: number): Levels {
  const { y, n, t, dt } = rec;
  const sorted = sortedSample(y);
  // The range runs from the 0.2 % to the 99.8 % point, widened to the fifth most extreme
  // three-point average, so a launch pulse narrower than 0.2 % of the record still spans it.
  const ext = extremes(y, 5);
  const lo = Math.min(percentileOf(sorted, 0.002), ext.lo);
  const hi = Math.max(percentileOf(sorted, 0.998), ext.hi);
  const range = Math.max(hi - lo, 1e-300);
  return {
    lo,
    hi,
    range,
    launchMin: Math.max(0.25 * range, Math.min(0.6 * range, 5 * slowNoise)),
    noise: slowNoise,
    bStart: sampleMedian(y, 0, Math.min(n, 5)),
    rest: sampleMedian(y, Math.floor(n / 5), n),
    zeroIdx: -t[0] / dt,
  };
}

interface LaunchEdge {
  ic: number;
  sign: number;
  imax: number;
  i10: number;
  i90: number;
  baseline: number;
  peak: number;
  riseSamples: number;
}

/**
 * Follow the launch edge from its first clear crossing `ic` to its top and back to its foot.
 * `steady`: the edge has no creep after it (a ρ trace's launch pulse), so it is still climbing
 * while it gains 2 % over its last top, however many samples that takes; otherwise each new
 * top must be 2 % over the one before, so a lossy line's slow creep is not taken as the launch.
 */
function traceLaunchEdge(y: Float64Array, ic: number, bStart: number, steady = false): LaunchEdge {
  const n = y.length;
  const sign = Math.sign(ys3(y, ic) - bStart) || 1;
  let maxDev = sign * (ys3(y, ic) - bStart);
  let imax = ic;
  let iTop = ic;
  let topDev = maxDev;
  // Where the edge left the starting level: its climb so far is timed from here.
  let foot = ic;
  while (foot > 0 && sign * (ys3(y, foot) - bStart) > 0.1 * maxDev) foot--;
  for (let i = ic + 1; i < n; i++) {
    const d = sign * (ys3(y, i) - bStart);
    if (d > maxDev) {
      // Only a clear rise counts as still climbing; a lossy line's slow creep does not.
      if (d > 1.02 * (steady ? topDev : maxDev)) {
        iTop = i;
        topDev = d;
      }
      maxDev = d;
      imax = i;
    }
    if (d < 0.75 * maxDev) break;
    if (i - iTop > Math.max(20, 6 * (iTop - ic + 1))) break;
    // A plateau: over twice the climb so far (from the edge's foot) the level has moved by
    // under a tenth of the launch. A lossy line's creep there is not the launch, and a second
    // rise after it is an event near the instrument, not more of the launch.
    const span = Math.max(4, 2 * (iTop - foot + 1));
    if (i - iTop >= span && sign * (ys3(y, i) - ys3(y, i - span)) < 0.1 * maxDev) break;
  }
  imax = Math.min(imax, iTop);
  // Start of the edge: walk back to where it left the starting level.
  let i10 = ic;
  while (i10 > 0 && sign * (ys3(y, i10) - bStart) > 0.1 * maxDev) i10--;
  const preEnd = Math.max(0, i10 - 2);
  const baseline = preEnd >= 1 ? sampleMedian(y, Math.max(0, preEnd - 2000), preEnd) : bStart;
  const peak = sign * (ys3(y, imax) - baseline);
  let i90 = i10;
  while (i90 < imax && sign * (ys3(y, i90) - baseline) < 0.9 * peak) i90++;
  return { ic, sign, imax, i10, i90, baseline, peak, riseSamples: Math.max(1, i90 - i10) };
}

/** First index from `from` where sign·(y − level) drops below `frac`·peak, or −1. */
function firstBelow(y: Float64Array, from: number, sign: number, level: number, frac: number, peak: number): number {
  for (let i = from; i < y.length; i++) if (sign * (ys3(y, i) - level) < frac * peak) return i;
  return -1;
}

/** Fraction of samples in [from, n) within `band` of `level`. */
function fractionNear(y: Float64Array, from: number, level: number, band: number): number {
  const n = y.length;
  if (from >= n) return 0;
  const step = Math.max(1, Math.floor((n - from) / 4001));
  let near = 0;
  let all = 0;
  for (let i = from; i < n; i += step, all++) if (Math.abs(y[i] - level) < band) near++;
  return near / all;
}

/**
 * Longest 10–90 % fall of a launch pulse, in its rise times. An instrument's pulse falls about
 * as fast as it rises; a fall of more than five rise times is a reflection that crossed the line.
 */
const FALL_OVER_RISE_MAX = 5;

/**
 * Farthest the median of a pulse record after its launch lies from the baseline, in launch
 * heights, when under 60 % of it rests there (a step into a fault of ρ ≥ −0.88 rests further off).
 */
const RESTING_MEDIAN_MAX = 0.12;

/**
 * Farthest from 0 V, in launch heights, that a pulse record in volts with no pre-trigger may rest on
 * the launch's side. A pulse generator's line idles at ground between pulses; a step into a fault of
 * ρ ≥ −0.5 rests at least half the incident level off it.
 */
const RESTING_OFFSET_MAX = 0.5;

/** Pulse or step: does the launch fall back below half its height soon, stay down, and the record rest at the baseline? */
function launchFall(
  y: Float64Array,
  e: LaunchEdge,
  pulseHintSamples: number | null,
  noise: number,
): { iFall: number; looksPulse: boolean } {
  const n = y.length;
  const { sign, baseline, peak, riseSamples, ic } = e;
  const iFall = firstBelow(y, e.imax, sign, baseline, 0.5, peak);
  if (iFall <= 0) return { iFall, looksPulse: false };
  const width = iFall - ic;
  const end = Math.min(n, iFall + Math.max(width, 4 * riseSamples));
  for (let i = iFall + riseSamples * 2; i < end; i++) {
    if (sign * (ys3(y, i) - baseline) > 0.5 * peak) return { iFall, looksPulse: false };
  }
  // Without a stated width, an excursion over a third of the record is taken as a step into
  // a near short: instruments set pulses much shorter than the record.
  const short = pulseHintSamples !== null ? width < 3 * pulseHintSamples + 4 * riseSamples : width < 0.35 * (n - ic);
  // A pulse record rests at its baseline after the launch, apart from its echoes; a step into
  // a near fault rests at 1 + ρ of the launch, off the baseline unless ρ is near −1. Wide
  // pulses on a low-loss line fill much of the record with echoes and their bounces, of both
  // signs: there the record's median still sits on the baseline.
  const near = fractionNear(y, Math.min(n, end), baseline, Math.max(0.1 * peak, 4 * noise));
  const rests =
    near >= 0.6 ||
    (near >= 0.3 && Math.abs(sampleMedian(y, Math.min(n - 1, end), n) - baseline) < RESTING_MEDIAN_MAX * peak);
  // The instrument's pulse falls back to the baseline as fast as it rose. A fall many rise
  // times long, down to the baseline, has come back along the line: it is a step's reflection
  // from a near fault, spread by the line's loss on the way.
  const fallsLikeLaunch = fallSamples(y, iFall, sign, baseline, peak).fall <= FALL_OVER_RISE_MAX * riseSamples;
  return { iFall, looksPulse: short && rests && fallsLikeLaunch };
}

/** 10–90 % duration of the falling edge that starts near `from` (sign·(y − level) falling from `peak`). */
function fallSamples(y: Float64Array, from: number, sign: number, level: number, peak: number): { i10: number; fall: number } {
  let i90 = from;
  while (i90 > 0 && sign * (ys3(y, i90) - level) < 0.9 * peak) i90--;
  let i10 = from;
  while (i10 < y.length - 1 && sign * (ys3(y, i10) - level) > 0.1 * peak) i10++;
  return { i10, fall: Math.max(1, i10 - i90) };
}

/** Incident level (step) or peak (pulse), and the first sample past the launch. */
function launchLevels(y: Float64Array, e: LaunchEdge, mode: Mode, iFall: number): { height: number; settleIdx: number } {
  const n = y.length;
  const { baseline, peak, riseSamples, i90 } = e;
  if (mode === 'pulse') {
    // The launch ends where its falling edge reaches 10 % of its height, plus one edge time.
    const f = fallSamples(y, iFall > 0 ? iFall : e.imax, e.sign, baseline, peak);
    return { height: e.sign * peak, settleIdx: Math.min(n - 1, f.i10 + Math.max(riseSamples, f.fall)) };
  }
  const from = Math.min(n - 1, i90 + riseSamples);
  const to = Math.min(n, from + Math.max(5, 2 * riseSamples));
  let height = sampleMedian(y, from, to) - baseline;
  if (!Number.isFinite(height) || height === 0) height = e.sign * peak;
  return { height, settleIdx: Math.min(n - 1, i90 + 2 * riseSamples) };
}

/** The launch's peak against the level `rest` and the first sample (3-point smoothed) back below half of it, or −1. */
function launchPeak(y: Float64Array, n: number, sign: number, rest: number): { peak: number; iFall: number } {
  let peak = 0;
  for (let i = 0; i < n; i++) {
    const d = sign * (ys3(y, i) - rest);
    if (d > peak) peak = d;
    if (d < 0.5 * peak) return { peak, iFall: i };
  }
  return { peak, iFall: -1 };
}

/** A pulse launch that opened before the record, read from its fall: width at half height, taking the axis zero as the rising 50 % point. */
function pulseOpenedBefore(n: number, sign: number, rest: number, peak: number, iFall: number, i10: number, fall: number, zeroIdx: number): Launch {
  return {
    found: true,
    onsetInRecord: false,
    settleIdx: Math.min(n - 1, i10 + fall),
    idx: 0,
    sign,
    baseline: rest,
    height: sign * peak,
    mode: 'pulse',
    modeDetected: true,
    riseSamples: fall,
    widthSamples: iFall - Math.min(0, zeroIdx),
    zeroIdx,
    clipped: false,
    clippedOnEdge: false,
  };
}

/**
 * A pulse record that starts during the launch: it opens far from its resting level,
 * holds there for longer than its falling edge lasts, then rests at that level.
 */
function launchBeforeRecord(rec: TraceRecord, lv: Levels, positiveOnly: boolean, smear = 0): Launch | null {
  const { y, n } = rec;
  const sign = Math.sign(lv.bStart - lv.rest) || 1;
  if (positiveOnly && sign < 0) return null;
  if (Math.abs(lv.bStart - lv.rest) < 0.5 * lv.launchMin) return null;
  const { peak, iFall } = launchPeak(y, n, sign, lv.rest);
  if (iFall < 3 || iFall > 0.3 * n || peak < lv.launchMin) return null;
  // In volts, a pulse record rests where the line idles between pulses, at the recorder's 0 V; a
  // record resting further from it than RESTING_OFFSET_MAX of the launch, on the launch's side, is
  // a step record whose level dropped at a fault past the launch (it rests at 1 + ρ of the step).
  if (rec.unit === 'V' && sign * lv.rest > RESTING_OFFSET_MAX * peak) return null;
  // A pre-trigger stretch before a step looks the same, but its axis zero is at the edge,
  // not at or before the record's start; where the axis just starts at 0, a positive
  // excursion is read as a launch pulse and a negative one as a pre-trigger baseline.
  if (lv.zeroIdx > 0.5 * iFall || (Math.abs(lv.zeroIdx) < 0.5 && sign < 0)) return null;
  const { i10, fall } = fallSamples(y, iFall, sign, lv.rest, peak);
  // A record averaged over k samples for the search shows each edge up to k − 1 samples longer
  // than it is, and its 50 % point where it was.
  if (iFall < fall - smear) return null;
  // It rests there after the launch, apart from its echoes; a wide pulse on a short line fills
  // much of the record with echoes and their bounces, and then the median still sits on the level.
  const after = Math.min(n - 1, i10 + 2 * fall);
  const near = fractionNear(y, after, lv.rest, 0.25 * peak);
  if (!(near >= 0.6 || (near >= 0.3 && Math.abs(sampleMedian(y, after, n) - lv.rest) < RESTING_MEDIAN_MAX * peak))) return null;
  return pulseOpenedBefore(n, sign, lv.rest, peak, iFall, i10, fall, lv.zeroIdx);
}

/**
 * Smallest move, in launch heights beyond what the line past a fault can return (see
 * wideLaunchBeforeRecord), that a step record cannot show: a floor for a lossy line's slow creep
 * after the fault's edge (from memory: a few hundredths of the launch).
 */
const RETURN_MARGIN = 0.05;

/**
 * Deepest fall, as the level left after it in launch heights from 0 V, that a step reading would take
 * as a short (ρ ≤ SHORT_MAX_RHO of classify.ts, −0.8).
 */
const SHORT_LEVEL_MAX = 0.2;

/**
 * A pulse record in volts that starts during a launch too wide for launchBeforeRecord (its echoes fill
 * the record after it, so it rests nowhere for long): it opens on the launch, falls back near 0 V, where
 * a pulse generator's line idles, rests there, and then moves again sooner and further than a step
 * record can. Read as a step (whose level before its launch is 0 V), the fall is a fault of
 * ρ = −1 + ε, ε the level left after it in launch heights. What the line beyond returns crosses that
 * fault twice, each arrival at most (1 + ρ)(1 − ρ) ≤ 2ε of its size (Pozar §2.3), and arrivals follow
 * one another no faster than the quiet stretch after the fall lasted (the round trip from the fault to
 * the first thing beyond it): by a window's end, at most 2ε for each such stretch since the fall. The
 * source's re-reflection of the fault's wave comes back at twice the fault's round trip: since the
 * record began after the launch's onset, no sooner than twice the fall's sample. A move larger than
 * that bound (plus RETURN_MARGIN and five deviations of the noise over the window), held over a window
 * as long as the fall, before then, is an echo: the launch is the pulse before it.
 */
function wideLaunchBeforeRecord(rec: TraceRecord, lv: Levels): Launch | null {
  const { y, n } = rec;
  const sign = Math.sign(lv.bStart) || 1;
  let top = 0;
  let iDown = -1;
  for (let i = 0; i < n; i++) {
    const d = sign * ys3(y, i);
    if (d > top) top = d;
    if (d < 0.5 * top) {
      iDown = i;
      break;
    }
  }
  if (iDown < 3 || top < lv.launchMin) return null;
  const down = fallSamples(y, iDown, sign, 0, top);
  // The fall has settled half its length past its 10 % point: the level there, over one fall.
  const from = down.i10 + Math.ceil(down.fall / 2);
  const len = down.fall;
  if (from + 2 * len > n) return null;
  const rest = sampleMedian(y, from, from + len);
  const eps = Math.abs(rest) / top;
  if (!(eps <= SHORT_LEVEL_MAX)) return null;
  const noise = (5 * lv.noise) / Math.sqrt(len);
  const last = Math.min(n, 2 * iDown) - len;
  const stride = Math.max(1, Math.floor(len / 4));
  // The quiet stretch: up to the first window that leaves the level by more than its noise.
  let quiet = -1;
  let returns = false;
  for (let j = from + len; j <= last && !returns; j += stride) {
    const move = Math.abs(sampleMedian(y, j, j + len) - rest);
    if (quiet < 0 && move > noise) quiet = j - iDown;
    if (quiet > 0) returns = move > (2 * eps * Math.max(1, (j + len - iDown) / quiet) + RETURN_MARGIN) * top + noise;
  }
  if (!returns) return null;
  // The launch against the level the line rests at.
  const { peak, iFall } = launchPeak(y, n, sign, rest);
  if (iFall < 3) return null;
  const { i10, fall } = fallSamples(y, iFall, sign, rest, peak);
  return { ...pulseOpenedBefore(n, sign, rest, peak, iFall, i10, fall, lv.zeroIdx), restAt: from + len / 2 };
}

/** A flat run at the record's own extreme that the edge hits while still steep. */
function clipOf(y: Float64Array, from: number, to: number, sign: number): 'edge' | 'top' | null {
  // A noise-free record's tops are flat anyway: only a noisy baseline makes flatness telling.
  const before = new Set<number>();
  for (let i = Math.max(0, from - 200); i < Math.max(0, from - 20); i++) before.add(y[i]);
  if (before.size <= 2) return null;
  let ext = y[from];
  for (let i = from; i < to; i++) if (sign * y[i] > sign * ext) ext = y[i];
  let global = ext;
  for (let i = 0; i < y.length; i++) if (sign * y[i] > sign * global) global = y[i];
  if (ext !== global) return null;
  const first = y.findIndex((v, i) => i >= from && v === ext);
  if (first < 2) return null;
  let run = 0;
  while (first + run < y.length && y[first + run] === ext) run++;
  if (run < 3) return null;
  let steepest = 0;
  for (let i = from + 1; i <= first; i++) steepest = Math.max(steepest, sign * (y[i] - y[i - 1]));
  if (sign * (y[first] - y[first - 1]) >= 0.3 * steepest && steepest > 0) return 'edge';
  // A launch that only just reaches the limit meets it where its edge has flattened; the run at the
  // extreme gives it away where the record's noise spans quantiser steps: two samples of noise σ land
  // on one step with odds about q / (2√π·σ), so CLIP_RUN_MIN equal samples at σ ≥ 2q come by chance
  // less than once in 10¹¹ (normal difference of two samples, from memory).
  const q = adcStep(y);
  return run >= CLIP_RUN_MIN && estimateNoise(y) >= 2 * q ? 'top' : null;
}

const clipFlags = (c: 'edge' | 'top' | null) => ({ clipped: c !== null, clippedOnEdge: c === 'edge' });

/** Equal samples at the record's extreme read as the recorder's limit where its noise spans quantiser steps. */
const CLIP_RUN_MIN = 16;

function noLaunch(rec: TraceRecord, lv: Levels, modeOpt: 'auto' | Mode, baseline: number, height: number): Launch {
  const n = rec.n;
  return {
    found: false,
    onsetInRecord: false,
    settleIdx: Math.min(n - 1, Math.max(0, Math.ceil(lv.zeroIdx))),
    idx: Math.min(n - 1, Math.max(0, Math.round(lv.zeroIdx))),
    sign: 1,
    baseline,
    height,
    mode: modeOpt === 'pulse' ? 'pulse' : 'step',
    modeDetected: modeOpt === 'auto',
    riseSamples: 0,
    widthSamples: null,
    zeroIdx: lv.zeroIdx,
    clipped: false,
    clippedOnEdge: false,
  };
}

/**
 * Smallest climb, in launch heights, of the stretch before a launch edge's foot that shows the
 * record opening on the edge itself rather than on a pre-trigger level (from memory: a pre-trigger
 * stretch holds its level to within its noise, and a few hundredths of the launch allow for drift).
 */
const OPENING_CLIMB_MIN = 0.05;

/**
 * A record whose stretch before the launch edge's foot already climbs towards the launch opens on the
 * edge: the level before the launch is not in it, and the first samples are no baseline. Where the
 * record rests further back than where it opened (on the far side of the edge's start), that resting
 * level is the baseline a pre-trigger would have shown: the edge read against it, or null.
 */
function restingBaseline(y: Float64Array, e: LaunchEdge, lv: Levels): LaunchEdge | null {
  const preEnd = e.i10 - 2;
  if (preEnd < 6) return null;
  const third = Math.max(2, Math.floor(preEnd / 3));
  const climb = e.sign * (sampleMedian(y, preEnd - third, preEnd) - sampleMedian(y, 0, third));
  if (!(climb > Math.max(5 * lv.noise, OPENING_CLIMB_MIN * e.peak))) return null;
  if (!(e.sign * (lv.rest - ys3(y, 0)) < 0)) return null;
  // The launch's top against that level: the highest it climbs before falling back below half of it.
  let peak = 0;
  let imax = e.ic;
  for (let i = e.ic; i < y.length; i++) {
    const d = e.sign * (ys3(y, i) - lv.rest);
    if (d > peak) {
      peak = d;
      imax = i;
    } else if (d < 0.5 * peak) break;
  }
  if (!(peak > e.peak)) return null;
  return { ...e, imax, baseline: lv.rest, peak };
}

/**
 * The launch edge that crosses the search's bar at ic, or the first of two edges. The launch is the
 * first excursion larger than a quarter of the record's range; the bar is raised above that against
 * slow noise, and a noisy launch smaller than the bar is passed over for a larger rise after it: the
 * edge traced back from there would take in the launch, its plateau and the rise together (an event
 * near the instrument inside the launch's rise). Where the record already stood a quarter of its
 * range off its starting level without a break back to ic, rested there on a plateau (at least twice
 * that first edge's climb long, its halves' medians within a tenth of its height, the test
 * traceLaunchEdge makes going forward), and then rose by another quarter of the range, the first
 * edge is the launch and the second rise an event.
 */
function firstOfTwo(y: Float64Array, ic: number, lv: Levels, steady: boolean): LaunchEdge {
  const edge = traceLaunchEdge(y, ic, lv.bStart, steady);
  const quarter = 0.25 * lv.range;
  const side = Math.sign(ys3(y, ic) - lv.bStart) || 1;
  let iq = ic;
  while (iq > 0 && side * (ys3(y, iq - 1) - lv.bStart) > quarter) iq--;
  if (iq >= ic) return edge;
  const first = traceLaunchEdge(y, iq, lv.bStart, steady);
  // The plateau, from the first edge's top to ic.
  const from = first.imax + 1;
  const climb = Math.max(1, first.imax - first.i10);
  if (ic - from < Math.max(4, 2 * climb)) return edge;
  const mid = (from + ic) >> 1;
  const a = sampleMedian(y, from, mid);
  const b = sampleMedian(y, mid, ic);
  if (!(Math.abs(b - a) < 0.1 * first.peak)) return edge;
  // The second rise stands another quarter of the range above the plateau.
  if (!(side * (ys3(y, edge.imax) - b) > quarter)) return edge;
  return first;
}

/** The launch found from its edge inside the record, or null when there is no clear excursion. */
function launchInRecord(rec: TraceRecord, lv: Levels, modeOpt: 'auto' | Mode, hint: number | null, steady = false): Launch | null {
  const { y, n } = rec;
  let ic = -1;
  const { bStart, launchMin } = lv;
  for (let i = 0; i < n - 1; i++) {
    if (Math.abs(ys3(y, i) - bStart) > launchMin && Math.abs(ys3(y, i + 1) - bStart) > launchMin) {
      ic = i;
      break;
    }
  }
  if (ic < 0) return null;
  const edge = firstOfTwo(y, ic, lv, steady);
  const fell = launchFall(y, edge, hint, lv.noise);
  const { iFall } = fell;
  let { looksPulse } = fell;
  const unknownBase = !looksPulse && modeOpt === 'auto' ? restingBaseline(y, edge, lv) : null;
  if (unknownBase) {
    // The record opens on the launch's edge, so the level before it is not in the record: the level
    // the record rests at stands in for it, as a pre-trigger would have shown it, to tell a pulse
    // from a step; the launch's own levels are still read from the edge as the record holds it.
    looksPulse = launchFall(y, unknownBase, hint, lv.noise).looksPulse;
  }
  const mode: Mode = modeOpt === 'auto' ? (looksPulse ? 'pulse' : 'step') : modeOpt;
  const { height, settleIdx } = launchLevels(y, edge, mode, iFall);
  return {
    found: true,
    onsetInRecord: true,
    settleIdx,
    idx: edge.i10,
    sign: edge.sign,
    baseline: edge.baseline,
    height,
    mode,
    modeDetected: modeOpt === 'auto',
    riseSamples: edge.riseSamples,
    widthSamples: mode === 'pulse' && iFall > 0 ? iFall - edge.ic : null,
    zeroIdx: lv.zeroIdx,
    ...clipFlags(clipOf(y, edge.i10, Math.min(n, settleIdx + 1), edge.sign)),
  };
}

/** A ρ trace: a launch at −1 before it, a launch pulse of about +1, or no launch (reference plane). */
function rhoLaunch(rec: TraceRecord, lv: Levels, modeOpt: 'auto' | Mode, hint: number | null): Launch {
  const { y, n } = rec;
  if (modeOpt !== 'step') {
    const before = launchBeforeRecord(rec, lv, true);
    if (before && before.height >= 0.5) return { ...before, modeDetected: modeOpt === 'auto' };
    // A ρ trace's launch pulse: a finely sampled edge is followed to its top.
    const inRecord = launchInRecord(rec, lv, 'auto', hint, true);
    if (inRecord && inRecord.mode === 'pulse' && inRecord.height >= 0.5 && inRecord.idx < 0.3 * n) {
      return { ...inRecord, modeDetected: modeOpt === 'auto' };
    }
  }
  const from = Math.min(n - 5, Math.max(0, Math.ceil(lv.zeroIdx)));
  const base = sampleMedian(y, from, Math.min(n, from + Math.max(5, Math.min(200, Math.floor(n / 100)))));
  return noLaunch(rec, lv, modeOpt, Number.isFinite(base) ? base : 0, 1);
}

/**
 * A noisy record is averaged over k samples before its launch is looked for, k chosen so
 * the noise falls to 3 % of the record's range (σ/√k ≤ 0.03·range): the quarter-range
 * crossing that finds the launch is then eight noise deviations out. k is at most a 200th of
 * the record, or a third of the stated pulse width when that is more (a short record of a
 * wide pulse); the noise the launch is then held against is that of the averaged record.
 */
function forLaunchSearch(
  rec: TraceRecord,
  sigma0: number,
  pulseHintSamples: number | null,
): { rec: TraceRecord; noise: number; k: number; averagedNoise: number } {
  const sorted = sortedSample(rec.y);
  const range = percentileOf(sorted, 0.998) - percentileOf(sorted, 0.002);
  if (!(range > 0) || sigma0 <= 0.03 * range) return { rec, noise: sigma0, k: 1, averagedNoise: sigma0 };
  // At most a 200th of the record, or a third of a stated pulse width (a boxcar that short keeps
  // the pulse's top): a short record of a wide pulse may be averaged over more than its 200th.
  const kRecord = Math.max(1, Math.floor(rec.n / 200));
  const kPulse = pulseHintSamples !== null ? Math.floor(pulseHintSamples / 3) : 1;
  const k = Math.min(Math.max(kRecord, kPulse), Math.ceil((sigma0 / (0.03 * range)) ** 2));
  if (k <= 1) return { rec, noise: sigma0, k: 1, averagedNoise: sigma0 };
  const y = boxcar(rec.y, k);
  // Averaged over more than the record's 200th, for a stated pulse, the launch is looked for
  // against the averaged record's noise: white noise falls as 1/√k; the slow part that
  // averaging keeps is read from the averaged record itself (its differences over lags shorter
  // than k see less than it holds, hence the white floor).
  const averagedNoise = Math.max(sigma0 / Math.sqrt(k), estimateSlowNoise(y));
  const noise = k > kRecord ? averagedNoise : sigma0;
  return { rec: { ...rec, y }, noise, k, averagedNoise };
}

export function findLaunch(record: TraceRecord, modeOpt: 'auto' | Mode, pulseHintSamples: number | null, sigma0 = 0): Launch {
  const { rec, noise, k, averagedNoise } = forLaunchSearch(record, sigma0, pulseHintSamples);
  const lv = recordLevels(rec, noise);
  if (rec.unit === 'rho' && Math.abs(lv.bStart + 1) > 0.35) return rhoLaunch(rec, lv, modeOpt, pulseHintSamples);
  if (modeOpt !== 'step') {
    // A launch before the record is read from the averaged record alone: against its own noise.
    const before = launchBeforeRecord(rec, k > 1 ? recordLevels(rec, averagedNoise) : lv, false, k - 1);
    if (before) return { ...before, modeDetected: modeOpt === 'auto' };
  }
  if (rec.unit === 'V' && Math.abs(lv.bStart) > 0.35 * lv.range && Math.sign(lv.bStart) === Math.sign(lv.hi + lv.lo)) {
    // A launch too wide for launchBeforeRecord, with an echo no step record can show after it.
    const wide = modeOpt !== 'step' ? wideLaunchBeforeRecord(rec, lv) : null;
    if (wide) return { ...wide, modeDetected: modeOpt === 'auto' };
    // The record begins after the launch's onset, at the incident level or still on the launch
    // edge (a record without pre-trigger opens on it, its axis zero at the edge's middle): the
    // incident level is where that opening climb settles, as for an edge inside the record.
    const opening = traceLaunchEdge(rec.y, 0, 0);
    const climbed = opening.imax > 0 && opening.sign === Math.sign(lv.bStart) ? launchLevels(rec.y, opening, 'step', -1) : null;
    // Only a climb that stands clear of the noise (five deviations) moves the level.
    const rises = climbed !== null && Math.abs(climbed.height) - Math.abs(lv.bStart) > 5 * lv.noise;
    const height = rises ? climbed.height : lv.bStart;
    const launch = noLaunch(rec, lv, modeOpt, 0, height);
    return rises ? { ...launch, settleIdx: Math.max(launch.settleIdx, climbed.settleIdx) } : launch;
  }
  return (
    launchInRecord(rec, lv, modeOpt, pulseHintSamples) ??
    noLaunch(rec, lv, modeOpt, lv.bStart, rec.unit === 'rho' ? 1 : lv.range || 1)
  );
}
