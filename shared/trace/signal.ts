/**
 * Working signal u, in units of the reflection coefficient.
 *
 * Step: the trace normalised so that the matched line is 0, an open +1 and a
 * short −1 (the step-response reading of ρ, e.g. B. M. Oliver, "Time domain
 * reflectometry", Hewlett-Packard Journal 15(6), 1964). Pulse: the running
 * integral of the trace, divided by the launch pulse's area, so each echo
 * becomes a step whose height is its area ratio. Cable loss spreads an echo but
 * keeps its area (the line's DC gain), so area is the loss-robust measure of ρ.
 */
import { adcStep, heldStretches, noiseExcess } from './noise';
import { boxcar, madSigma, restingLevel, sampleMedian } from './stats';
import type { Launch, TraceRecord, WorkingSignal } from './steps';

function stepSignal(rec: TraceRecord, L: Launch): Float64Array {
  const { y, n } = rec;
  const u = new Float64Array(n);
  if (L.found) for (let i = 0; i < n; i++) u[i] = (y[i] - L.baseline) / L.height - 1;
  else if (rec.unit === 'rho') for (let i = 0; i < n; i++) u[i] = y[i] - L.baseline;
  else for (let i = 0; i < n; i++) u[i] = y[i] / L.height - 1;
  return u;
}

/**
 * Most a pulse record's baseline drifts over the record, in launch heights (an instrument's
 * drift is a few per cent of its pulse; common practice, from memory).
 */
const DRIFT_MAX = 0.1;

/** Blocks the record after the launch is cut into, to find where it rests. */
const RESTING_BLOCKS = 16;

/**
 * Where a pulse record rests, when its echoes fill one of its halves: the record after the
 * launch in sixteen blocks, a block resting where its robust spread is the sample noise's and
 * the means of its halves agree within four deviations of their difference; the baseline is
 * then the line through the resting blocks' medians by Theil–Sen (the median of the slopes
 * between pairs, H. Theil 1950; P. K. Sen, J. Amer. Statist. Assoc. 63 (1968) 1379), which a
 * few echo tops that look flat cannot tilt. Null when fewer than three blocks rest there.
 */
function restingLine(y: Float64Array, a0: number, sigma0: number): { level: number; at: number; slope: number } | null {
  const n = y.length;
  const len = Math.floor((n - a0) / RESTING_BLOCKS);
  if (len < 16 || !(sigma0 > 0)) return null;
  const half = len >> 1;
  const mean = (a: number, b: number) => {
    let s = 0;
    for (let i = a; i < b; i++) s += y[i];
    return s / (b - a);
  };
  const centres: number[] = [];
  const levels: number[] = [];
  for (let b = 0; b < RESTING_BLOCKS; b++) {
    const from = a0 + b * len;
    const to = from + len;
    const spread = madSigma(y, from, to);
    const drift = Math.abs(mean(from + half, to) - mean(from, from + half));
    if (spread <= 1.5 * sigma0 && drift <= 4 * sigma0 * Math.sqrt(2 / half)) {
      centres.push((from + to) / 2);
      levels.push(sampleMedian(y, from, to));
    }
  }
  // An echo's flat top rests too, at its own level: the baseline is the level most resting
  // blocks share (within three sample deviations).
  let best: number[] = [];
  for (const l of levels) {
    const near = levels.flatMap((m, k) => (Math.abs(m - l) <= 3 * sigma0 ? [k] : []));
    if (near.length > best.length) best = near;
  }
  if (best.length < 3) return null;
  centres.splice(0, centres.length, ...best.map((k) => centres[k]));
  levels.splice(0, levels.length, ...best.map((k) => levels[k]));
  const slopes: number[] = [];
  for (let i = 0; i < centres.length; i++)
    for (let j = i + 1; j < centres.length; j++) slopes.push((levels[j] - levels[i]) / (centres[j] - centres[i]));
  const slope = sampleMedian(Float64Array.from(slopes).sort(), 0, slopes.length);
  const at = sampleMedian(Float64Array.from(centres), 0, centres.length);
  const level = sampleMedian(Float64Array.from(levels.map((l, k) => l - slope * (centres[k] - at))), 0, levels.length);
  return { level, at, slope };
}

/** Fewest pre-trigger samples whose median is taken as the level the record starts from (common practice, from memory). */
const PRE_TRIGGER_MIN = 16;

/**
 * How many more samples must rest on the line through the pre-trigger level than on the line through
 * the halves' levels for it to be taken instead: a quarter more (a judgement, not a published value), so
 * that where both fit the record about as well (the halves' medians hold), the reading stays as it was.
 */
const RESTING_MARGIN = 1.25;

/**
 * The line a pulse record rests on after its launch, through the level of its pre-trigger stretch
 * (`level` at sample `at`): the record's baseline is its offset plus a linear drift (DRIFT_MAX), the
 * same before the launch as after it, so only the drift is unknown. Between its echoes the record
 * rests on that line, apart from its noise; the drift is the one, within ±DRIFT_MAX over the record,
 * that the most samples after the launch rest on (within `tol`), refined by least squares through
 * the pre-trigger level over those samples. The most samples, not half of them: on a short cable
 * read with a wide pulse, or a record full of long echoes, the echoes can fill more than half of
 * the record (or of either half), and a median then sits on an echo.
 */
export function restingDrift(
  y: Float64Array,
  a0: number,
  anchor: { level: number; at: number },
  tol: number,
  slopeMax: number,
): number {
  const n = y.length;
  const step = Math.max(1, Math.floor((n - a0) / 4001));
  const xs: number[] = [];
  const rs: number[] = [];
  for (let i = a0; i < n; i += step) {
    xs.push(i - anchor.at);
    rs.push(y[i] - anchor.level);
  }
  if (xs.length < 8 || !(tol > 0) || !(slopeMax > 0)) return 0;
  const reach = Math.max(...xs.map(Math.abs));
  // Slopes a step apart move the line by at most half the band over the record.
  const count = Math.min(801, Math.max(3, 2 * Math.ceil((2 * slopeMax * reach) / tol) + 1));
  const resting = (s: number) => {
    let c = 0;
    for (let k = 0; k < xs.length; k++) if (Math.abs(rs[k] - s * xs[k]) <= tol) c++;
    return c;
  };
  let best = 0;
  let bestCount = resting(0);
  for (let j = 0; j < count; j++) {
    const s = slopeMax * ((2 * j) / (count - 1) - 1);
    const c = resting(s);
    if (c > bestCount || (c === bestCount && Math.abs(s) < Math.abs(best))) {
      best = s;
      bestCount = c;
    }
  }
  // Least squares through the pre-trigger level over the samples resting on the line, twice.
  for (let it = 0; it < 2; it++) {
    let sxr = 0;
    let sxx = 0;
    for (let k = 0; k < xs.length; k++) {
      if (Math.abs(rs[k] - best * xs[k]) > tol) continue;
      sxr += xs[k] * rs[k];
      sxx += xs[k] * xs[k];
    }
    if (sxx > 0) best = sxr / sxx;
  }
  return best;
}

/**
 * The level most of values[from, to) rest on: the centre of the interval 2·tol wide that holds the
 * most of them (the modal interval, H. Chernoff, "Estimation of the mode", Ann. Inst. Statist. Math.
 * 16 (1964) 31), as the median of the values in it; from a regular subsample of at most 4001. Unlike
 * the median it stays on the line when echoes of several levels together fill most of the record.
 */
export function modalLevel(values: ArrayLike<number>, from: number, to: number, tol: number): number {
  const len = to - from;
  if (len <= 0 || !(tol > 0)) return NaN;
  const step = Math.max(1, Math.floor(len / 4001));
  const v = new Float64Array(Math.ceil(len / step));
  for (let i = from, j = 0; i < to; i += step, j++) v[j] = values[i];
  v.sort();
  let best = 0;
  let bestCount = 0;
  for (let a = 0, b = 0; a < v.length; a++) {
    while (b < v.length && v[b] - v[a] <= 2 * tol) b++;
    if (b - a > bestCount) {
      bestCount = b - a;
      best = a;
    }
  }
  const m = best + ((bestCount - 1) >> 1);
  return bestCount % 2 ? v[m] : (v[m] + v[m + 1]) / 2;
}

/**
 * The launch pulse as recorded, in launch peaks: the shape every echo of a loss-free line repeats. None where the launch
 * is not whole in the record or was clipped on its edge.
 */
function launchTemplate(pulseRaw: Float64Array, L: Launch): Float64Array | null {
  if (!L.found || !L.onsetInRecord || L.clippedOnEdge || L.mode !== 'pulse') return null;
  // From half a rise before its 10 % point to a rise past its fall: the flat ends would add only noise.
  const rise = Math.max(1, L.riseSamples);
  const from = Math.max(0, L.idx - Math.ceil(rise / 2));
  const to = Math.min(pulseRaw.length, L.settleIdx + 1, L.idx + (L.widthSamples ?? rise) + 2 * rise);
  return to - from >= 3 ? pulseRaw.slice(from, to) : null;
}

/** Pulse mode: baseline-free trace (in launch peaks) and its running integral in launch areas. */
function pulseSignal(rec: TraceRecord, L: Launch, sigma0: number): { u: Float64Array; pulseRaw: Float64Array; unitArea: number } {
  const { y, n } = rec;
  const u = new Float64Array(n);
  const pulseRaw = new Float64Array(n);
  const scale = L.found ? L.height : 1;
  // After the launch a pulse trace sits on its baseline except for its echoes, so a line
  // through the medians of the two halves is a robust baseline and drift estimate; on a short
  // cable read with a wide pulse the echoes fill a half, and the line is drawn through the
  // stretches where the trace rests instead (see restingLine).
  // After a pre-trigger stretch the baseline is also known where the record starts: where
  // clearly more of the record rests on the line through that level (restingDrift) than on
  // the halves' line, the echoes filled a half's median and that line is taken instead.
  const a0 = Math.min(n - 1, L.settleIdx);
  const mid = Math.floor((a0 + n) / 2);
  // Each half's level: the median, which on a recorder with a visible quantiser step sits on one of its
  // levels, up to half a step from where the line rests (a bias the running sum turns into a ramp); there
  // the mean of the samples on the median's level and its two neighbours (restingLevel), which the noise
  // dithers about the resting level and an echo standing clear of it does not reach.
  const q = adcStep(y);
  const h1 = restingLevel(y, a0, mid, 1.5 * q);
  const m2 = restingLevel(y, mid, n, 1.5 * q);
  // Halves whose medians lie more than a tenth of the launch apart hold an echo, not drift.
  const resting = Math.abs(m2 - h1) > DRIFT_MAX * Math.abs(scale) ? restingLine(y, a0, sigma0) : null;
  const m1 = resting?.level ?? h1;
  const c1 = resting?.at ?? (a0 + mid) / 2;
  const c2 = (mid + n) / 2;
  const slope = resting?.slope ?? (Number.isFinite(m1) && Number.isFinite(m2) && c2 > c1 ? (m2 - m1) / (c2 - c1) : 0);
  // A launch after a pre-trigger stretch: the line continues the level the record starts from
  // (the median of up to 2000 samples before the launch's foot, as launch.ts reads it).
  // A wide launch before the record was seen resting just past it (Launch.restAt): the line continues
  // that level, however long its echoes rest elsewhere, since that stretch is what told the launch apart.
  const preEnd = L.idx - 2;
  const restSeen = L.found && L.restAt !== undefined && a0 < n - 8;
  const anchored = restSeen || (L.found && L.onsetInRecord && preEnd >= PRE_TRIGGER_MIN && a0 < n - 8);
  const anchor = { level: L.baseline, at: L.restAt ?? (Math.max(0, preEnd - 2000) + preEnd) / 2 };
  const tol = Math.max(3 * sigma0, 1.5 * q);
  const drift = anchored ? restingDrift(y, a0, anchor, tol, (DRIFT_MAX * Math.abs(scale)) / Math.max(1, n - 1)) : 0;
  const halvesAt = (i: number) => (i < a0 ? L.baseline : m1 + slope * (i - c1));
  const lineAt = (i: number) => anchor.level + drift * (i - anchor.at);
  const restOn = (f: (i: number) => number) => {
    let c = 0;
    const st = Math.max(1, Math.floor((n - a0) / 4001));
    for (let i = a0; i < n; i += st) if (Math.abs(y[i] - f(i)) <= tol) c++;
    return c;
  };
  const useLine = restSeen || (anchored && restOn(lineAt) > RESTING_MARGIN * restOn(halvesAt));
  // Halves that agree may both sit on echoes (a short cable's echoes and their bounces filling most
  // of the record): the level the most samples after the launch rest on (modalLevel) is taken
  // instead where clearly more of the record rests on it, as the pre-trigger's line is.
  const modal = !useLine && resting === null ? modalLevel(y, a0, n, tol) : NaN;
  const modalAt = (i: number) => (i < a0 ? L.baseline : modal);
  const useModal = Number.isFinite(modal) && restOn(modalAt) > RESTING_MARGIN * restOn(halvesAt);
  const baseAt = useLine ? lineAt : useModal ? modalAt : halvesAt;
  let acc = 0;
  for (let i = 0; i < n; i++) {
    const v = (y[i] - baseAt(i)) / scale;
    pulseRaw[i] = v;
    acc += v;
    u[i] = acc;
  }
  let unitArea = 1;
  if (L.found) {
    // Area of the launch pulse, in samples, from the flat stretch before it to where it has settled.
    const from = Math.max(0, L.idx - 2 * L.riseSamples);
    const to = Math.min(n - 1, L.settleIdx);
    unitArea = u[to] - u[from];
    // A launch that began before the record: add the part before it, from its width at half height.
    if (!L.onsetInRecord && L.widthSamples !== null) unitArea = Math.max(unitArea, L.widthSamples);
    if (!(unitArea > 0)) unitArea = L.widthSamples ?? 1;
  }
  for (let i = 0; i < n; i++) u[i] /= unitArea;
  return { u, pulseRaw, unitArea };
}

/**
 * A pulse record's quantiser step where its noise is below half of it (0 elsewhere). Noise of half a
 * step or more dithers the recorder, so its levels read a small echo in proportion; quieter, a sample
 * only changes level where the signal crosses the rounding point, and slow noise or drift near that
 * point makes runs of one level up or down that no echo is needed to explain.
 */
function pulseQuantiserStep(y: Float64Array, sigma0: number): number {
  const q = adcStep(y);
  return q > 0 && sigma0 < 0.5 * q ? q : 0;
}

/**
 * `scratch`, when given (n + 1 values), holds the noise measure's temporary sums instead of a new array;
 * `recorded` is the record as the recorder gave it, whose quantiser step a corrected `rec.y` no longer shows.
 */
export function buildWorkingSignal(
  rec: TraceRecord,
  L: Launch,
  sigma0: number,
  scratch?: Float64Array,
  recorded: Float64Array = rec.y,
): WorkingSignal {
  const mode = L.mode;
  const { n } = rec;
  const { u, pulseRaw, unitArea } =
    mode === 'step' ? { u: stepSignal(rec, L), pulseRaw: new Float64Array(0), unitArea: 1 } : pulseSignal(rec, L, sigma0);
  const sigmaU = mode === 'step' ? sigma0 / Math.abs(L.found || rec.unit !== 'rho' ? L.height : 1) : 0;
  const pulseTemplate = mode === 'pulse' ? launchTemplate(pulseRaw, L) : null;
  const scaleForPulse = mode === 'pulse' ? sigma0 / Math.abs(L.found ? L.height : 1) / unitArea : 0;
  // The shortest edge in u: the launch's rise (step), or the ramp an echo of the launch
  // pulse makes in the running integral, about 0.8 of its width (pulse).
  const edge = L.found ? Math.max(L.riseSamples, mode === 'pulse' ? 0.4 * (L.widthSamples ?? 0) : 0) : 2;
  const w0 = Math.max(2, Math.round(edge));
  // Smoothing for onset timing: a short boxcar, the same for the launch and every event.
  const smoothW = Math.max(1, Math.round(w0 / 3));
  const us = boxcar(u, smoothW);
  const held = mode === 'step' ? heldStretches(rec.y) : null;
  const clipNoiseUpTo = mode === 'pulse' && L.found ? 2 * (L.widthSamples ?? 0) : 0;
  // The blind zone ends one filter window past the launch's settling. The search starts
  // earlier (a step: one rise past its 90 % point), so an event inside the blind zone that
  // stands out of it can still be reported.
  const blindEnd = Math.min(n - 1, L.settleIdx + (L.found ? w0 : 0));
  const earliest = L.found && L.onsetInRecord && mode === 'step' ? L.idx + 2 * L.riseSamples : L.settleIdx;
  const start = Math.min(blindEnd, Math.max(0, earliest));
  const blindIdx = L.found ? blindEnd : Math.max(0, Math.ceil(L.zeroIdx));
  return {
    mode,
    u,
    us,
    pulseRaw,
    pulseTemplate,
    unitArea,
    sigmaU,
    scaleForPulse,
    w0,
    smoothW,
    start,
    blindIdx,
    // A step record clipped after the cable end holds a long flat stretch with no noise in it.
    // (A pulse record's u is a running sum, never held flat by a clipped peak.)
    clipNoiseUpTo,
    noiseExcess: noiseExcess(rec.y, sigma0, scratch, held, clipNoiseUpTo),
    held,
    quantU: mode === 'step' ? adcStep(rec.y) / Math.abs(L.found || rec.unit !== 'rho' ? L.height : 1) : 0,
    quantRaw: mode === 'pulse' ? pulseQuantiserStep(recorded, sigma0) / Math.abs(L.found ? L.height : 1) : 0,
  };
}
