/**
 * Edge fit: the arrival time and height of each detected event, in two passes.
 *
 * 1. Reading (fitEdges): the level just before the event, the level after it
 *    (widened until a lossy edge stops rising), and its onset by the tangent
 *    construction of onset.ts. Cheap, and good enough to merge and sort events.
 * 2. Line fit (fitLineEdges): each event is modelled as the line's own response,
 *    the launch as recorded convolved with the round trip's skin-effect erfc
 *    edge and dielectric spread (loss.ts), and its delay and height are fitted by
 *    least squares over a window around the event only: the height and the level
 *    before it enter linearly and are solved exactly for each trial delay
 *    (variable projection, G. H. Golub and V. Pereyra, SIAM J. Numer. Anal. 10
 *    (1973) 413), the delay by a grid then golden-section search on the residual
 *    (J. Kiefer, Proc. AMS 4 (1953) 502). The delay's standard uncertainty is
 *    σ·√(2/S''), from the residual's curvature at the minimum (the Gauss–Newton
 *    covariance of one parameter). The fitted delay is the arrival at the
 *    lossless speed, so far events no longer read late, and the fitted height is
 *    the reflection coefficient the loss had hidden.
 *    With the cable's loss unknown, the skin parameter is fitted on the clearest
 *    far event and scaled to the others by distance.
 */
import { SPEED_OF_LIGHT_M_PER_S } from '../cable/propagation';
import {
  attenuationDbPer100m,
  DB_PER_NEPER,
  exactAttenuationNpPerM,
  erfc,
  exactLineKernel,
  lineKernel,
  lossModelFromPoints,
  lossModelThroughLine,
  NO_LOSS,
  zeroPhaseLineKernel,
  type LineKernel,
  type LossModel,
  type LossPoint,
} from './loss';
import { estimateFromIncident } from './loss-estimate';
import { launchOnsetTimer, measureOnset, type Onset } from './onset';
import { lineFit, sampleMedian } from './stats';
import type { Candidate, Launch, Measured, TraceRecord, WorkingSignal } from './steps';

export interface EdgeFitInput {
  rec: TraceRecord;
  launch: Launch;
  signal: WorkingSignal;
  /** Smallest |ρ| kept. */
  rhoMin: number;
  /** Velocity factor, to turn a delay into the length of line the wave crossed. */
  vf?: number;
  /** The cable's attenuation at stated frequencies, when known. */
  loss?: readonly LossPoint[];
  /** The pulse width `vf` was measured at, ns: the speed it gives is that of this pulse's frequencies. */
  vfPulseWidthNs?: number;
}

const lowFraction = (sigmaLocal: number, height: number) => Math.min(0.3, Math.max(0.1, (3 * sigmaLocal) / Math.abs(height)));

/**
 * Latest onset the level-window widening may move an edge to. The step filter's peak marks where the
 * edge is, to within the detection's timing uncertainty: at scale w, F's slope beside the peak of an edge is
 * height/w, so noise of F = height/snr moves the peak by about w/snr, and the peak is taken on a stride of
 * w/4 (detection.ts), so it may lie up to half a stride off. An onset (the foot of the edge) lies at or
 * before the edge's middle; three such uncertainties past the peak is the noise picking a later foot.
 */
export function latestOnset(c: Pick<Candidate, 'i' | 'w' | 'snr'>): number {
  const stride = Math.max(1, Math.floor(c.w / 4));
  return c.i + stride / 2 + (3 * c.w) / Math.max(c.snr, 1);
}

/**
 * Earliest middle the detection allows an edge: the filter's peak less the same half stride and three
 * timing uncertainties w/snr as latestOnset. An onset lies before its edge's middle by up to FOOT_TO_MIDDLE
 * of the edge's 10–90 % rise, so the earliest onset a reading of rise R can have is this less that share of R.
 */
export function earliestMiddle(c: Pick<Candidate, 'i' | 'w' | 'snr'>): number {
  const stride = Math.max(1, Math.floor(c.w / 4));
  return c.i - stride / 2 - (3 * c.w) / Math.max(c.snr, 1);
}

/**
 * How far the tangent construction's onset lies before the edge's middle, in 10–90 % rises: a ramp runs
 * from 0 to 100 % in rise/0.8, so its foot is half of that, 0.625 rise, before its middle (the ramp's geometry;
 * rounder edges put the construction's onset closer to the middle).
 */
export const FOOT_TO_MIDDLE = 0.625;

/**
 * A lossy edge keeps rising long after the filter window: widen the level window
 * to a few times the edge's own 10–90 % time until the level stops changing. A wider
 * window that puts the onset after `latest` and reads the edge less than half as slow
 * as before has found a noise excursion's foot, not this edge's: the reading stops there.
 * So does one that puts the onset before the earliest the detection allows the reading it would
 * replace (`earliestMid` less FOOT_TO_MIDDLE of that reading's rise), where that reading itself lies
 * inside the detection's bounds: on a small, noisy edge the level read further out barely changes, but
 * its 50 % crossing lands on a later noise excursion, and the construction walks the onset back
 * through the noise before the edge.
 */
export function settleLossyEdge(
  us: Float64Array,
  first: { r: Onset; height: number; fLo: number },
  base: number,
  w: number,
  limit: number,
  preFrom: number,
  sigmaLocal: number,
  latest = Infinity,
  earliestMid = -Infinity,
): { r: Onset; height: number; fLo: number; settleTo: number | null; stillMoving: number } {
  let { r, height, fLo } = first;
  let settleTo: number | null = null;
  let stillMoving = 0;
  let prevChange = Infinity;
  const n = us.length;
  for (let iter = 0; iter < 6; iter++) {
    const base0 = base;
    const rise = Math.max(w, r.rise);
    const a = Math.min(limit - 1, Math.round(r.onset + 2 * rise));
    const b = Math.min(limit, Math.round(r.onset + 4 * rise));
    if (b - a < 1) break;
    const hNext = sampleMedian(us, a, b) - base0;
    settleTo = b;
    const midAB = Math.floor((a + b) / 2);
    if (midAB > a && b > midAB) stillMoving = (sampleMedian(us, midAB, b) - sampleMedian(us, a, midAB)) / (hNext || 1);
    if (Math.sign(hNext) !== Math.sign(height)) break;
    const change = Math.abs(hNext - height) / Math.abs(height);
    // A lossy edge settles: each widening adds less than the one before. A level that keeps
    // running away is a slope in the working signal (drift, a neighbour's tail), not this edge.
    if (iter > 0 && change > 0.25 && change >= prevChange) break;
    const fNext = lowFraction(sigmaLocal, hNext);
    const rNext = measureOnset(us, a, () => base, hNext, fNext, preFrom, Math.min(n - 1, b));
    // Past the detection's bound, and sharper than the reading it would replace: the noise's foot.
    if (rNext.onset > latest && rNext.rise < 0.5 * r.rise) break;
    // Before the detection's bound for the reading it would replace, which lay inside it: the noise's foot.
    const earliest = earliestMid - FOOT_TO_MIDDLE * r.rise;
    if (rNext.onset < earliest && r.onset >= earliest && r.onset <= latest) break;
    prevChange = change;
    height = hNext;
    fLo = fNext;
    r = rNext;
    if (change < 0.02 || b >= limit) break;
  }
  return { r, height, fLo, settleTo, stillMoving };
}

/**
 * The level before an edge, read again where the edge has not begun: null where the window it was read
 * over, ending at preTo, already ends before the edge's toe (half its rise before the tangent
 * construction's onset, onset.ts). Otherwise the window ends at that toe and reaches back two of the
 * edge's rise times, no further than the edge before it (prevEnd); null if that leaves under two samples.
 */
export function footLevel(
  us: Float64Array,
  r: Onset,
  base: number,
  preTo: number,
  prevEnd: number,
): { level: number; from: number; to: number } | null {
  if (!Number.isFinite(r.onset) || preTo <= r.onset) return null;
  const to = Math.floor(r.onset - 0.5 * r.rise);
  const from = Math.max(prevEnd, to - Math.max(2, Math.round(2 * r.rise)));
  if (to - from < 2) return null;
  const level = lineFit(us, from, to)(to);
  return Number.isFinite(level) && level !== base ? { level, from, to } : null;
}

/** Largest deviation of the raw pulse-domain echo from its onset to `to`, in launch peaks. */
function echoPeakOf(input: EdgeFitInput, onset: number, to: number): number {
  const { rec, launch: L, signal } = input;
  let echoPeak = 0;
  if (signal.mode !== 'pulse') return 0;
  for (let i = Math.max(0, Math.floor(onset)); i < to; i++) {
    const d = (rec.y[i] - L.baseline) / (L.found ? L.height : 1);
    if (Math.abs(d) > Math.abs(echoPeak)) echoPeak = d;
  }
  return echoPeak;
}

function fitOne(input: EdgeFitInput, accepted: Candidate[], k: number, prevEnd: number): Measured | null {
  const { signal: sig, rhoMin } = input;
  const { us } = sig;
  const n = us.length;
  const c = accepted[k];
  const w = c.w;
  const next = k + 1 < accepted.length ? accepted[k + 1].i - accepted[k + 1].w : n;
  const preTo = Math.max(prevEnd + 2, c.i - Math.round(1.5 * w));
  const preFrom = Math.max(prevEnd, preTo - 2 * w);
  // Flat baseline at the level just before the event: a slope fitted over a short
  // window and extended across a slow edge does more harm than the creep it would follow.
  let baseLevel = lineFit(us, preFrom, Math.max(preFrom + 1, preTo))(preTo);
  const base = () => baseLevel;
  const postFrom = Math.min(n - 1, c.i + w);
  const postTo = Math.min(n, Math.max(postFrom + 1, Math.min(c.i + 2 * w, next)));
  const h = sampleMedian(us, postFrom, postTo) - baseLevel;
  // Largest excursion around the event, for blips.
  let peakDev = 0;
  for (let i = Math.max(preTo, c.i - w); i < Math.min(n, c.i + w); i++) {
    const d = us[i] - baseLevel;
    if (Math.abs(d) > Math.abs(peakDev)) peakDev = d;
  }
  const blip = Math.abs(h) < 0.5 * Math.abs(peakDev);
  let height = blip ? peakDev : h;
  if (Math.abs(height) < rhoMin || Math.sign(height) !== c.sign) return null;
  const sigmaLocal = sig.mode === 'step' ? sig.sigmaU / Math.sqrt(sig.smoothW) : sig.scaleForPulse * Math.sqrt(sig.smoothW);
  const nextPre = k + 1 < accepted.length ? accepted[k + 1].i - 2 * accepted[k + 1].w : n;
  const limit = Math.max(postTo, Math.min(n, nextPre));
  let fLo = lowFraction(sigmaLocal, height);
  let r = measureOnset(us, blip ? c.i : postFrom, base, height, fLo, preFrom, Math.min(n - 1, postTo));
  let settleTo = postTo;
  let stillMoving = 0;
  if (!blip) {
    const s = settleLossyEdge(us, { r, height, fLo }, baseLevel, w, limit, preFrom, sigmaLocal, latestOnset(c), earliestMiddle(c));
    ({ r, height, fLo, stillMoving } = s);
    if (s.settleTo !== null) settleTo = s.settleTo;
    // The level before is read where the edge has not begun. The first window is set by the detection's
    // scale, which a record with no launch edge in it cannot size from the instrument's rise: where that
    // scale is narrower than the edge, the window lies on the edge's own foot and reads it short. Only
    // there, and on step records: with the launch's rise known, a slower edge is one the line has spread
    // (settleLossyEdge and the line fit read it), and re-reading its level before moved a lossy series
    // fault by 4 m on the simulator sweep; on a pulse record's running sum it moved many echoes' sizes
    // and distances with no gain on the tuning sets.
    let readTo = sig.mode === 'step' && !input.launch.found ? preTo : -Infinity;
    for (let pass = 0; pass < 3; pass++) {
      const foot = footLevel(us, r, baseLevel, readTo, prevEnd);
      if (foot === null) break;
      const h2 = height + baseLevel - foot.level;
      const again = { r, height: h2, fLo: lowFraction(sigmaLocal, h2) };
      if (Math.sign(again.height) !== c.sign || Math.abs(again.height) < rhoMin) break;
      again.r = measureOnset(us, postFrom, () => foot.level, again.height, again.fLo, foot.from, Math.min(n - 1, postTo));
      const s2 = settleLossyEdge(us, again, foot.level, w, limit, foot.from, sigmaLocal, latestOnset(c), earliestMiddle(c));
      ({ r, height, fLo, stillMoving } = s2);
      if (s2.settleTo !== null) settleTo = s2.settleTo;
      baseLevel = foot.level;
      readTo = foot.to;
    }
  }
  return {
    onsetIdx: r.onset,
    t50Idx: r.t50,
    riseSamples: r.rise,
    height,
    heightRaw: height,
    lossCorrected: false,
    peakDev,
    blip,
    snr: c.snr,
    w,
    endIdx: settleTo,
    fLo,
    echoPeak: echoPeakOf(input, r.onset, postTo),
    levelBefore: baseLevel,
    stillMoving,
  };
}

/** Time and size each detected event. */
export function fitEdges(input: EdgeFitInput, accepted: Candidate[]): Measured[] {
  const measured: Measured[] = [];
  const n = input.signal.us.length;
  let prevEnd = input.signal.start;
  for (let k = 0; k < accepted.length; k++) {
    const m = fitOne(input, accepted, k, prevEnd);
    if (!m) continue;
    measured.push(m);
    prevEnd = Math.min(n - 1, Math.max(prevEnd, accepted[k].i + accepted[k].w));
  }
  return measured;
}

// ---- pass 2: the line fit ----

/** Points a fit window is reduced to, at most, by block means: the fit's cost stays bounded on long records. */
const MAX_FIT_POINTS = 600;
/** The same for the fits that estimate an unknown loss. */
const ESTIMATE_POINTS = 300;
/**
 * How closely those fits place the delay, in blocks: only their residual is used, and near its minimum
 * the residual changes with the square of the delay's error, so a twentieth of a block changes it by
 * far less than the noise does (the full fits go to a thousandth).
 */
const ESTIMATE_DELAY_TOL = 0.05;
/** Relative change of the loss parameter used to measure a delay's sensitivity to the loss model. */
export const LOSS_PROBE = 0.25;

export type LossSource = 'library' | 'estimated' | 'none';

/** What the line fit adds to a measured edge. */
export interface LineFit {
  /** What the delay counts from: the recorded launch, or the trace's own time zero. */
  reference: 'launch' | 'axis';
  /** Where the loss model came from. */
  lossSource: LossSource;
  /** Round trip at the lossless speed, in samples. */
  delaySamples: number;
  /** Standard uncertainty of the delay from the fit, samples. */
  sigmaDelaySamples: number;
  /** Height as read before the line fit (loss not corrected). */
  heightRaw: number;
  /** Change of the delay when the loss parameter is LOSS_PROBE larger, samples. */
  lossSensitivitySamples: number;
  /** How far after the arrival the modelled edge reaches half height (step) or its peak (pulse), samples. */
  lossDelaySamples: number;
  /** The loss model's dielectric term, nepers per metre per hertz (for the dispersion it implies). */
  dielectricNpPerMPerHz: number;
}

/** Launch shape in the fit's domain (step: u's first difference; pulse: the launch pulse), on the full-rate grid. */
interface LaunchShape {
  kind: 'measured' | 'synthetic';
  step: boolean;
  reference: 'launch' | 'axis';
  /** Measured: sample range of the launch. */
  from: number;
  to: number;
  /** Synthetic: centre and σ of a Gaussian edge, samples. */
  centre: number;
  sigma: number;
  /** Synthetic pulse: width at half height, samples (0 for a step). */
  width: number;
}

function launchShape(input: EdgeFitInput): LaunchShape | null {
  const { launch: L, signal: sig, rec } = input;
  const step = sig.mode === 'step';
  const rise = Math.max(1, L.riseSamples);
  if (L.found && L.onsetInRecord && !L.clippedOnEdge) {
    const from = Math.max(0, L.idx - Math.max(4, 2 * rise));
    const to = Math.min(rec.n - 1, Math.max(L.settleIdx, L.idx + 2 * rise) + rise);
    return { kind: 'measured', step, reference: 'launch', from, to, centre: 0, sigma: 0, width: 0 };
  }
  // No usable launch: a Gaussian edge centred on time zero (a reference-plane trace's edges are
  // symmetric about their delay), as sharp as the record's own rise allows (10–90 % is 2.5631 σ).
  const sigma = Math.max(0.5, rise / 2.5631);
  if (step) return { kind: 'synthetic', step, reference: 'axis', from: 0, to: 0, centre: L.zeroIdx, sigma, width: 0 };
  // A pulse record that starts during its launch: the launch as its measured width and rise, its
  // leading edge's half height at time zero (where the file's axis puts the launch).
  if (L.found && !L.onsetInRecord && L.widthSamples !== null && L.widthSamples > 0 && !L.clippedOnEdge)
    return { kind: 'synthetic', step, reference: 'axis', from: 0, to: 0, centre: L.zeroIdx, sigma, width: L.widthSamples };
  return null;
}

/** Block means of x over the blocks J0 … J1−1 of q samples (block J covers [Jq, Jq + q)). */
function blockMeans(x: Float64Array, j0: number, j1: number, q: number): Float64Array {
  const out = new Float64Array(Math.max(0, j1 - j0));
  const n = x.length;
  for (let j = j0; j < j1; j++) {
    const a = Math.max(0, j * q);
    const b = Math.min(n, j * q + q);
    let acc = 0;
    for (let i = a; i < b; i++) acc += x[i];
    out[j - j0] = b > a ? acc / (b - a) : x[Math.min(n - 1, Math.max(0, a))];
  }
  return out;
}

/** Standard normal distribution function, Φ(z) = erfc(−z/√2)/2. */
const gaussCdf = (z: number) => 0.5 * erfc(-z / Math.SQRT2);

/** The launch's impulse on the grid of q-sample blocks: values[j] sits at block start + j. */
function coarseLaunch(input: EdgeFitInput, shape: LaunchShape, q: number): { values: Float64Array; start: number } {
  if (shape.kind === 'synthetic') {
    // Block J's mean sits at sample Jq + (q − 1)/2.
    const c = (shape.centre - (q - 1) / 2) / q;
    const sg = Math.max(0.3, shape.sigma / q);
    const wq = shape.width / q;
    const start = Math.floor(c - 5 * sg);
    const len = Math.ceil(10 * sg + wq) + 2;
    const values = new Float64Array(len);
    for (let j = 0; j < len; j++) {
      const x = start + j - c;
      // Step: the edge's impulse (block differences of its rise). Pulse: the pulse itself, a rise up
      // at time zero and a fall width w later, both Gaussian-edged.
      values[j] = shape.step ? gaussCdf(x / sg) - gaussCdf((x - 1) / sg) : gaussCdf(x / sg) - gaussCdf((x - wq) / sg);
    }
    return { values, start };
  }
  const j0 = Math.floor(shape.from / q);
  const j1 = Math.ceil(shape.to / q) + 1;
  const src = shape.step ? input.signal.u : input.signal.pulseRaw;
  const means = blockMeans(src, j0, j1, q);
  if (!shape.step) return { values: means, start: j0 };
  const values = new Float64Array(Math.max(1, means.length - 1));
  for (let j = 0; j + 1 < means.length; j++) values[j] = means[j + 1] - means[j];
  return { values, start: j0 + 1 };
}

/** A reflection's shape on the block grid: value at block J for delay D is at x = J − start − D. */
interface Template {
  values: Float64Array;
  start: number;
  step: boolean;
}

function buildTemplate(launch: { values: Float64Array; start: number }, kernel: LineKernel, step: boolean): Template {
  const a = launch.values;
  const g = kernel.values;
  const out = new Float64Array(a.length + g.length - 1);
  for (let i = 0; i < a.length; i++) {
    const ai = a[i];
    if (ai === 0) continue;
    for (let k = 0; k < g.length; k++) out[i + k] += ai * g[k];
  }
  if (step) for (let i = 1; i < out.length; i++) out[i] += out[i - 1];
  return { values: out, start: launch.start - kernel.offset, step };
}

function templateAt(t: Template, x: number): number {
  const v = t.values;
  if (x <= 0) return x === 0 ? v[0] : 0;
  const last = v.length - 1;
  if (x >= last) return t.step ? v[last] : 0;
  const i = Math.floor(x);
  const f = x - i;
  return v[i] + f * (v[i + 1] - v[i]);
}

interface WindowData {
  y: Float64Array;
  /** Fit a sloping baseline (step records creep on lossy lines). */
  slope: boolean;
  /** Block index of y[0]. */
  j0: number;
  q: number;
}

/**
 * Residual sum of squares of y ≈ b + h·template at delay d, with b and h solved exactly;
 * with `fixedH`, the height is held at that value and only the baseline is solved.
 */
function profile(w: WindowData, t: Template, d: number, fixedH?: number, extra?: Extra): { ss: number; b: number; h: number } {
  const { y, j0 } = w;
  const n = y.length;
  // Normal equations for y ≈ b + c·x + h·e, x centred on the window (step records creep on lossy lines).
  let sx = 0, sxx = 0, se = 0, see = 0, sxe = 0, sy = 0, sxy = 0, sey = 0, syy = 0;
  const slope = w.slope;
  for (let k = 0; k < n; k++) {
    const e = templateAt(t, j0 + k - t.start - d);
    const x = slope ? (k - (n - 1) / 2) / n : 0;
    const yk = extra ? y[k] - extra.g * templateAt(extra.t, j0 + k - extra.t.start - d) : y[k];
    sx += x;
    sxx += x * x;
    se += e;
    see += e * e;
    sxe += x * e;
    sy += yk;
    sxy += x * yk;
    sey += e * yk;
    syy += yk * yk;
  }
  if (fixedH !== undefined) return profileAtHeight({ n, sx, sxx, se, see, sxe, sy, sxy, sey, syy }, slope, fixedH);
  const sol = slope
    ? solve3([n, sx, se, sx, sxx, sxe, se, sxe, see], [sy, sxy, sey])
    : solve2(n, se, see, sy, sey);
  if (!sol) {
    const b = sy / n;
    return { ss: syy - n * b * b, b, h: 0 };
  }
  const [b, c, h] = sol;
  return { ss: Math.max(0, syy - b * sy - c * sxy - h * sey), b, h };
}

/**
 * profile with a second shape at the same delay whose height is free between 0 and `bound(h)` of the
 * first's (an end's reversed creep, at most the share a resistor of that ρ sends back): y ≈ b + c·x + h·e + g·e₂
 * solved exactly, then, where g falls outside, held at the nearer bound.
 */
function profileShared(w: WindowData, t: Template, t2: Template, d: number, bound: (h: number) => number): { ss: number; b: number; h: number; g: number } {
  const { y, j0 } = w;
  const n = y.length;
  const cols = w.slope ? 4 : 3;
  const a = new Float64Array(cols * cols);
  const r = new Float64Array(cols);
  let syy = 0;
  const row = new Float64Array(cols);
  for (let k = 0; k < n; k++) {
    row[0] = 1;
    let c = 1;
    if (w.slope) row[c++] = (k - (n - 1) / 2) / n;
    row[c++] = templateAt(t, j0 + k - t.start - d);
    row[c] = templateAt(t2, j0 + k - t2.start - d);
    for (let i = 0; i < cols; i++) {
      r[i] += row[i] * y[k];
      for (let j = 0; j < cols; j++) a[i * cols + j] += row[i] * row[j];
    }
    syy += y[k] * y[k];
  }
  const sol = solveSymmetric(a, r, cols);
  const fixed = (g: number) => ({ ...profile(w, t, d, undefined, { t: t2, g }), g });
  if (!sol) return fixed(bound(0));
  const h = sol[cols - 2];
  const g = sol[cols - 1];
  const lim = bound(h);
  if (!(Math.sign(g) === Math.sign(lim) && Math.abs(g) <= Math.abs(lim))) return fixed(Math.sign(g) === Math.sign(lim) ? lim : 0);
  let fit = 0;
  for (let i = 0; i < cols; i++) fit += sol[i] * r[i];
  return { ss: Math.max(0, syy - fit), b: sol[0], h, g };
}

/** The symmetric system a·x = r (cols × cols) by Gaussian elimination with partial pivoting; null when singular. */
function solveSymmetric(a0: Float64Array, r0: Float64Array, cols: number): Float64Array | null {
  const a = Float64Array.from(a0);
  const r = Float64Array.from(r0);
  const scale = Math.max(...Array.from({ length: cols }, (_, i) => Math.abs(a[i * cols + i])), 1e-300);
  for (let c = 0; c < cols; c++) {
    let p = c;
    for (let i = c + 1; i < cols; i++) if (Math.abs(a[i * cols + c]) > Math.abs(a[p * cols + c])) p = i;
    if (!(Math.abs(a[p * cols + c]) > 1e-14 * scale)) return null;
    if (p !== c) {
      for (let j = 0; j < cols; j++) [a[c * cols + j], a[p * cols + j]] = [a[p * cols + j], a[c * cols + j]];
      [r[c], r[p]] = [r[p], r[c]];
    }
    for (let i = c + 1; i < cols; i++) {
      const f = a[i * cols + c] / a[c * cols + c];
      for (let j = c; j < cols; j++) a[i * cols + j] -= f * a[c * cols + j];
      r[i] -= f * r[c];
    }
  }
  const x = new Float64Array(cols);
  for (let i = cols - 1; i >= 0; i--) {
    let v = r[i];
    for (let j = i + 1; j < cols; j++) v -= a[i * cols + j] * x[j];
    x[i] = v / a[i * cols + i];
  }
  return x;
}

/** A second shape at the same delay with its height given (a terminated end's mismatch to the line, terminatedFit). */
interface Extra {
  t: Template;
  g: number;
}

/** The residual of y − h·e ≈ b + c·x from the normal equations' sums, h given. */
function profileAtHeight(
  s: { n: number; sx: number; sxx: number; se: number; see: number; sxe: number; sy: number; sxy: number; sey: number; syy: number },
  slope: boolean,
  h: number,
): { ss: number; b: number; h: number } {
  const sy = s.sy - h * s.se;
  const sxy = s.sxy - h * s.sxe;
  const syy = s.syy - 2 * h * s.sey + h * h * s.see;
  const det = s.n * s.sxx - s.sx * s.sx;
  if (!slope || !(det > 1e-12 * s.n * Math.max(s.sxx, 1e-300))) {
    const b = sy / s.n;
    return { ss: Math.max(0, syy - b * sy), b, h };
  }
  const b = (s.sxx * sy - s.sx * sxy) / det;
  const c = (s.n * sxy - s.sx * sy) / det;
  return { ss: Math.max(0, syy - b * sy - c * sxy), b, h };
}

function solve2(n: number, se: number, see: number, sy: number, sey: number): [number, number, number] | null {
  const det = n * see - se * se;
  if (!(det > 1e-12 * n * Math.max(see, 1e-300))) return null;
  const h = (n * sey - se * sy) / det;
  return [(sy - h * se) / n, 0, h];
}

/** The 3×3 symmetric system m·x = r by Cramer's rule; null when singular. */
function solve3(m: number[], r: number[]): [number, number, number] | null {
  const [a, b, c, , e, f, , , i] = m;
  const det = a * (e * i - f * f) - b * (b * i - f * c) + c * (b * f - e * c);
  if (!(Math.abs(det) > 1e-14 * Math.abs(a * e * i))) return null;
  const x0 = (r[0] * (e * i - f * f) - b * (r[1] * i - f * r[2]) + c * (r[1] * f - e * r[2])) / det;
  const x1 = (a * (r[1] * i - f * r[2]) - r[0] * (b * i - f * c) + c * (b * r[2] - r[1] * c)) / det;
  const x2 = (a * (e * r[2] - r[1] * f) - b * (b * r[2] - r[1] * c) + r[0] * (b * f - e * c)) / det;
  return [x0, x1, x2];
}

/** Minimum of f on [a, b] by golden-section search, one new evaluation per step. */
function goldenMin(f: (x: number) => number, a: number, b: number, tol: number, maxIter = 60): { x: number; fx: number } {
  const phi = (Math.sqrt(5) - 1) / 2;
  let c = b - phi * (b - a);
  let e = a + phi * (b - a);
  let fc = f(c);
  let fe = f(e);
  for (let it = 0; it < maxIter && b - a > tol; it++) {
    if (fc < fe) {
      b = e;
      e = c;
      fe = fc;
      c = b - phi * (b - a);
      fc = f(c);
    } else {
      a = c;
      c = e;
      fc = fe;
      e = a + phi * (b - a);
      fe = f(e);
    }
  }
  return fc < fe ? { x: c, fx: fc } : { x: e, fx: fe };
}

/** Delay of least residual in [lo, hi]: a grid of at most 24 steps (none over a few samples), then golden-section search around its best point. */
function bestDelay(
  w: WindowData,
  t: Template,
  lo: number,
  hi: number,
  sign: number,
  fixedH?: number,
  tol = 1e-3,
  extra?: Extra,
): { d: number; ss: number; h: number } {
  return searchDelay((d) => profile(w, t, d, fixedH, extra), lo, hi, sign, tol);
}

/** The delay search of bestDelay for any profile; `sign` 0 takes a height of either sign. */
function searchDelay<P extends { ss: number; h: number }>(prof: (d: number) => P, lo: number, hi: number, sign: number, tol: number): P & { d: number } {
  const steps = Math.max(8, Math.min(24, Math.ceil((hi - lo) / 0.5)));
  const step = (hi - lo) / steps;
  let best: P & { d: number } = { ...prof(lo), d: lo };
  if (!(sign === 0 || Math.sign(best.h) === sign)) best.ss = Infinity;
  for (let k = 1; k <= steps; k++) {
    const d = lo + k * step;
    const p = prof(d);
    if ((sign === 0 || Math.sign(p.h) === sign) && p.ss < best.ss) best = { ...p, d };
  }
  if (!Number.isFinite(best.ss)) return best;
  const g = goldenMin((d) => prof(d).ss, Math.max(lo, best.d - step), Math.min(hi, best.d + step), tol);
  const p = prof(g.x);
  return p.ss <= best.ss && (sign === 0 || Math.sign(p.h) === sign) ? { ...p, d: g.x } : best;
}

/** Standard uncertainty of the delay: σ√(2/S''), σ² from the residual (N − 3 degrees of freedom). */
function delaySigma(w: WindowData, t: Template, d: number, ss: number, fallback: number, fixedH?: number, extra?: Extra): number {
  const delta = 0.5;
  const curv = (profile(w, t, d + delta, fixedH, extra).ss - 2 * ss + profile(w, t, d - delta, fixedH, extra).ss) / (delta * delta);
  const dof = Math.max(1, w.y.length - (fixedH === undefined ? 3 : 2));
  if (!(curv > 0)) return fallback;
  return Math.min(fallback, Math.sqrt((2 * (ss / dof)) / curv));
}

/**
 * Samples from the start of a step's values to its half height; for a pulse (`integrate`), to the half height
 * of its running sum, the step it integrates to (half its area: on a skin-spread echo, far past its peak).
 */
export function halfHeightLag(values: Float64Array, integrate: boolean): number {
  let v = values;
  if (integrate) {
    v = new Float64Array(values.length);
    let acc = 0;
    for (let i = 0; i < v.length; i++) v[i] = acc += values[i];
  }
  return middleOf({ values: v, start: 0, step: true });
}

/** Samples from the arrival to the template's half height (step) or peak (pulse). */
function middleOf(t: Template): number {
  const v = t.values;
  let k = 0;
  if (t.step) {
    const top = v[v.length - 1];
    while (k < v.length - 1 && Math.abs(v[k]) < 0.5 * Math.abs(top)) k++;
    if (k > 0 && v[k] !== v[k - 1]) return k - 1 + (0.5 * top - v[k - 1]) / (v[k] - v[k - 1]);
    return k;
  }
  for (let i = 1; i < v.length; i++) if (Math.abs(v[i]) > Math.abs(v[k])) k = i;
  return k;
}

interface EventWindow {
  /** Full-rate sample range of the window. */
  from: number;
  to: number;
  /** Delay search range, full-rate samples. */
  lo: number;
  hi: number;
  sign: number;
}

interface FitContext {
  input: EdgeFitInput;
  shape: LaunchShape;
  /** Length of line (out and back) per sample of round trip, metres. */
  twoWayMPerSample: number;
  /** Earlier fitted events, subtracted from later windows so their slow tails do not pass for a baseline. */
  peeled: Peel[];
}

/** An earlier fitted event's shape, taken out of later windows; `k` is the event's index among those fitted. */
interface Peel {
  t: Template;
  q: number;
  d: number;
  h: number;
  k?: number;
}

/**
 * Where event k's fit window must end at the latest: the onset of the next event in time, or `end`. The events keep
 * the detection's order, but a slow edge's tangent reading can land before the reading of the event detected ahead
 * of it (a lossy pulse echo's long tail, read back towards its foot). Such an event lies before event k, not after
 * it, and does not end its window: taken as the next one, it would end the window before the window starts, and
 * event k would not be fitted at all.
 */
export function nextOnsetAfter(events: ReadonlyArray<{ onsetIdx: number }>, k: number, end: number): number {
  let next = end;
  for (let j = k + 1; j < events.length; j++) if (events[j].onsetIdx > events[k].onsetIdx) next = Math.min(next, events[j].onsetIdx);
  return next;
}

/** Full-rate window and delay range for event k of `events`. */
function eventWindow(ctx: FitContext, events: Measured[], k: number, extraBefore = 0): EventWindow {
  const { launch: L, signal: sig, rec } = ctx.input;
  const m = events[k];
  const riseL = Math.max(1, L.riseSamples);
  const riseE = Math.max(m.riseSamples, riseL);
  // The nearest earlier event bounds the window, unless it was fitted (its shape is taken out of the
  // window) and is smaller: a small one just before must not push the arrival late.
  let prev = -Infinity;
  for (let j = k - 1; j >= 0; j--) {
    const big = Math.abs(events[j].heightRaw ?? events[j].height) >= Math.abs(m.heightRaw ?? m.height);
    if (!events[j].fit || big) {
      prev = events[j].onsetIdx;
      break;
    }
  }
  const next = nextOnsetAfter(events, k, rec.n);
  const pre = Math.max(8, 2 * m.w, 3 * riseL);
  const post = Math.max(24, 8 * m.w, 6 * riseE, 3 * (L.widthSamples ?? 0));
  const ref = ctx.shape.reference === 'launch' ? L.idx : ctx.shape.centre;
  const d0 = (ctx.shape.reference === 'launch' ? m.onsetIdx : m.t50Idx) - ref;
  // The window starts a baseline's length before the earliest arrival tried, but after the previous event's
  // onset (whose fitted shape is taken out of it); no arrival is tried before the window.
  // The arrival is sought from a rise before the tangent reading (a third of one on step records, whose
  // baseline creeps on lossy lines and so cannot be stretched far back) to half a rise after it.
  const before = Math.max(8, 2 * riseL, ctx.shape.step ? riseE / 3 : riseE) + extraBefore;
  // On a slow edge the middle can lie far past the onset: the arrival is sought before both.
  const first = Math.min(d0, m.onsetIdx - ref);
  const earliest = ref + first - before;
  const from = Math.max(sig.start, Math.round(prev + 2), Math.round(Math.min(m.onsetIdx, earliest) - pre));
  const to = Math.min(rec.n, Math.round(m.onsetIdx + post), Math.round(next - Math.max(2, 0.5 * riseL)));
  const lo = Math.max(first - before, from + 2 - ref);
  return { from, to, lo, hi: Math.max(lo + 8, d0 + Math.max(8, 0.5 * riseE)), sign: Math.sign(m.height) || 1 };
}

function windowData(ctx: FitContext, win: EventWindow, q: number): WindowData {
  const src = ctx.shape.step ? ctx.input.signal.u : ctx.input.signal.pulseRaw;
  const j0 = Math.floor(win.from / q);
  const j1 = Math.max(j0 + 4, Math.ceil(win.to / q));
  const y = blockMeans(src, j0, j1, q);
  for (const p of ctx.peeled) {
    for (let k = 0; k < y.length; k++) {
      const centre = (j0 + k) * q + (q - 1) / 2;
      const jp = (centre - (p.q - 1) / 2) / p.q;
      y[k] -= p.h * templateAt(p.t, jp - p.t.start - p.d);
    }
  }
  return { y, j0, q, slope: ctx.shape.step };
}

interface ModelFit {
  /** Full-rate samples. */
  d: number;
  sigma: number;
  h: number;
  ss: number;
  t: Template;
  q: number;
  dq: number;
  middle: number;
  /** Full-rate samples from the arrival to the half height of the edge in the step domain (a pulse's integral). */
  halfLag: number;
  /** Points in the fitted window. */
  points: number;
}

/**
 * The frequency the velocity factor holds at. A dielectric whose loss rises as f slows the lower
 * frequencies (causalDielectric in loss.ts), so a speed is a speed at some frequency: that of the
 * pulse the VF was measured with, 1/(2·width), when the library says; otherwise the fastest the record
 * can show, its Nyquist frequency 1/(2·dt), the VF being taken as the line's high-frequency speed.
 */
function vfReferenceHz(input: EdgeFitInput): number {
  return input.vfPulseWidthNs ? 1 / (2 * input.vfPulseWidthNs * 1e-9) : 1 / (2 * input.rec.dt);
}

/** The round trip's causal response on the grid of q-sample blocks: exact propagation with a resistive term, else the sum of the loss terms. */
function causalKernel(ctx: FitContext, model: LossModel, twoWayM: number, q: number, span: number): LineKernel {
  const { rec, vf } = ctx.input;
  return (model.resistiveNpPerM ?? 0) > 0 && vf
    ? exactLineKernel(model, Math.max(0, twoWayM), rec.dt * q, span, vf, vfReferenceHz(ctx.input))
    : lineKernel(model, Math.max(0, twoWayM), rec.dt * q, span, vfReferenceHz(ctx.input));
}

/** Largest height a reflection can have at the port, in units of the incident wave. */
const MAX_HEIGHT = 1;

/** Fit one window with one loss model; `twoWayM` sets the size of the loss spread. */
function fitWindow(
  ctx: FitContext,
  win: EventWindow,
  model: LossModel,
  twoWayM: number,
  opts: { withMiddle?: boolean; maxPoints?: number; zeroPhase?: boolean; delayTol?: number } = {},
): ModelFit | null {
  const { rec } = ctx.input;
  const withMiddle = opts.withMiddle ?? true;
  const q = Math.max(1, Math.ceil((win.to - win.from) / (opts.maxPoints ?? MAX_FIT_POINTS)));
  const w = windowData(ctx, win, q);
  if (w.y.length < 6) return null;
  const launch = coarseLaunch(ctx.input, ctx.shape, q);
  const span = w.y.length + (win.hi - win.lo) / q + 8;
  const kernel = opts.zeroPhase ? zeroPhaseLineKernel(model, Math.max(0, twoWayM), rec.dt * q, span) : causalKernel(ctx, model, twoWayM, q, span);
  const t = buildTemplate(launch, kernel, ctx.shape.step);
  let best = bestDelay(w, t, win.lo / q, win.hi / q, win.sign, undefined, opts.delayTol);
  if (!Number.isFinite(best.ss)) return null;
  // No reflection exceeds the wave that met it (|ρ| ≤ 1): a fitted height past that means the model's
  // edge is off (a record ending on the rise, a baseline creeping), and the delay that went with it is
  // pulled too; the delay is then fitted again with the height held at the bound. Neither delay can be
  // trusted over the other, so the held one carries the gap between them as a uniform spread (±gap, u = gap/√3).
  let heldAt: number | undefined;
  let heldGap = 0;
  if (Math.abs(best.h) > MAX_HEIGHT) {
    heldAt = Math.sign(best.h) * MAX_HEIGHT;
    const held = bestDelay(w, t, win.lo / q, win.hi / q, win.sign, heldAt, opts.delayTol);
    if (!Number.isFinite(held.ss)) return null;
    heldGap = Math.abs(held.d - best.d);
    best = held;
  }
  const sigma = Math.hypot(delaySigma(w, t, best.d, best.ss, (win.hi - win.lo) / q / 2, heldAt), heldGap / Math.sqrt(3));
  const launchOnly = buildTemplate(launch, { values: Float64Array.of(1), offset: 0 }, ctx.shape.step);
  const middle = withMiddle ? middleOf(t) - kernel.offset - middleOf(launchOnly) : 0;
  // The tangent reading is taken on the step-domain signal (a pulse record's integral): the lag it is bounded by
  // is that of the integrated edge's half height, which a skin-spread pulse echo's long tail puts past its peak.
  const halfLag = !withMiddle ? 0 : ctx.shape.step ? middle : halfHeightLag(t.values, true) - kernel.offset - halfHeightLag(launchOnly.values, true);
  return {
    d: best.d * q,
    sigma: sigma * q,
    h: best.h,
    ss: best.ss,
    t,
    q,
    dq: best.d,
    middle: middle * q,
    halfLag: halfLag * q,
    points: w.y.length,
  };
}

/**
 * A resistive end on a line with series loss. The line's own impedance Zc(ω) is not its nominal Z0:
 * it grows at low frequency (creep.ts), so a resistor R = Z0·(1 + ρ)/(1 − ρ) at the far end reflects,
 * against the line that meets it, Γ = (R − Zc)/(R + Zc) = (ρ − ρ_in)/(1 − ρ·ρ_in), with
 * ρ_in = (Zc − Z0)/(Zc + Z0) the line's input reflection (the change of reference impedance of a
 * reflection coefficient; D. M. Pozar, "Microwave Engineering", 4th ed., §2.3 and §2.7). To first order
 * in ρ·ρ_in that is ρ − (1 − ρ²)·ρ_in: the usual edge of height ρ, plus the incident creep reversed,
 * both through the round trip. An end matched to Z0 (ρ = 0) sends back the reversed creep alone, a slow
 * drop from the end's round trip on that reads late, and smaller, on the edge of a plain reflection.
 * The fit is the plain one with the second shape added at the same delay, its height −(1 − ρ²) taken
 * from the height fitted the pass before (two passes). For an end, the second shape's height is then also
 * fitted freely between 0 and −(1 − ρ²) (profileShared), and taken where it leaves less: the share the
 * first-order reading gives is the most the record can hold, and the record often holds less (the library's
 * loss, a fit to a few frequencies, and the first-order reading both set it only roughly; a 64 Ω end on a
 * lossy coax, step record, read with the full share, was 21 m late). That adds a free parameter.
 * `sloped` fits the level with a slope (a step record's always does). An end's fit on a pulse record takes
 * it too: its baseline is a line through the resting level of the record's two halves (signal.ts,
 * pulseSignal), and past a resistive end the reversed creep's long tail fills the second half and tilts
 * that line, so the end's window sits on a slope the record's own echoes did not make. `element` 'edge'
 * leaves the second shape out: the plain edge on the same sloping level, for a fair comparison.
 * A lumped fault along the line meets the line's own impedance too, with the line going on past it:
 * a series resistor reflects Γ = R/(R + 2Zc), a shunt one −Zc/(Zc + 2R), to first order
 * ρ − 2|ρ|(1 − |ρ|)·ρ_in (ρ read against Z0; Pozar §2.3, §4.4). `element` 'fault' fits that share
 * instead: an end is told from a fault by which of the two the record follows. The second shape follows the line's exact
 * propagation (exactLineKernel); the first is the plain fit's own.
 */
function terminatedFit(
  ctx: FitContext,
  win: EventWindow,
  model: LossModel,
  twoWayM: number,
  element: 'end' | 'fault' | 'edge' = 'end',
  sloped = ctx.shape.step,
): (ModelFit & { g: number; tb: Template }) | null {
  const { rec, vf } = ctx.input;
  if (!vf || !((model.resistiveNpPerM ?? 0) > 0 || model.skinNpPerMRootHz > 0)) return null;
  const q = Math.max(1, Math.ceil((win.to - win.from) / MAX_FIT_POINTS));
  const w = { ...windowData(ctx, win, q), slope: sloped };
  if (w.y.length < 6) return null;
  const launch = coarseLaunch(ctx.input, ctx.shape, q);
  const span = w.y.length + (win.hi - win.lo) / q + 8;
  const ref = vfReferenceHz(ctx.input);
  const ta = buildTemplate(launch, causalKernel(ctx, model, twoWayM, q, span), ctx.shape.step);
  const tb = buildTemplate(launch, exactLineKernel(model, Math.max(0, twoWayM), rec.dt * q, span, vf, ref, 'inputReflection'), ctx.shape.step);
  const creepShare = (h: number) => (element === 'end' ? -(1 - h * h) : element === 'fault' ? -2 * Math.abs(h) * (1 - Math.abs(h)) : 0);
  let g = element === 'end' ? -1 : 0;
  let best: { d: number; ss: number; h: number } = { d: win.lo / q, ss: Infinity, h: 0 };
  for (let pass = 0; pass < 2; pass++) {
    best = bestDelay(w, ta, win.lo / q, win.hi / q, 0, undefined, undefined, { t: tb, g });
    if (!Number.isFinite(best.ss) || !(Math.abs(best.h) <= MAX_HEIGHT)) return null;
    if (pass === 0) g = creepShare(best.h);
  }
  if (element === 'end') {
    const free = searchDelay((d) => profileShared(w, ta, tb, d, creepShare), win.lo / q, win.hi / q, 0, 1e-3);
    if (Number.isFinite(free.ss) && free.ss < best.ss && Math.abs(free.h) <= MAX_HEIGHT) {
      best = free;
      g = free.g;
    }
  }
  const extra = { t: tb, g };
  const sigma = delaySigma(w, ta, best.d, best.ss, (win.hi - win.lo) / q / 2, undefined, extra);
  const launchOnly = buildTemplate(launch, { values: Float64Array.of(1), offset: 0 }, ctx.shape.step);
  const middle = middleOf(ta) - middleOf(launchOnly);
  return { d: best.d * q, sigma: sigma * q, h: best.h, ss: best.ss, t: ta, q, dq: best.d, middle: middle * q, halfLag: middle * q, points: w.y.length, g, tb };
}

/** The echo a terminated fit models, as the record shows it: its level at the window's end (step) or its area (pulse). */
function terminatedSeen(f: ModelFit & { g: number; tb: Template }, win: EventWindow): number {
  const last = Math.floor(win.to / f.q) - f.dq;
  const at = (x: number) => f.h * templateAt(f.t, x - f.t.start) + f.g * templateAt(f.tb, x - f.tb.start);
  if (f.t.step) return at(last);
  let area = 0;
  for (let x = Math.floor(win.from / f.q) - f.dq; x <= last; x++) area += at(x);
  return area;
}

/**
 * A terminated end's fit replaces the plain one where the data favour it by these odds. The two have
 * nearly the same free parameters (delay, height, level and slope; the end's creep share is bounded by
 * its edge's, and free inside that bound), so the ratio of their likelihoods, (S_plain/S_terminated)^(N/2)
 * for Gaussian residuals of unknown spread over N points, compares them directly; 100 is "decisive" on
 * H. Jeffreys' scale ("Theory of Probability", 3rd ed., 1961, appendix B), far past the factor of about
 * e^½ one more nested parameter gains on noise alone (Wilks' theorem, χ² with one degree of freedom).
 */
const TERMINATED_ODDS = 100;
/**
 * Largest share of the residual of the plain fit (and of the fault's, and on a pulse record the edge's) a
 * terminated end's fit may leave where it does not explain its window to the noise: an order of magnitude less.
 */
const TERMINATED_DOMINANT_SHARE = 0.1;
/**
 * Largest |ρ| read as a resistive end: a resistor within a factor of three of Z0. Further out the edge
 * itself outweighs the reversed creep (whose share 1 − ρ² falls towards an open or a short), and the
 * plain edge reads the end as well.
 */
const TERMINATED_MAX_RHO = 0.5;
/**
 * The same on a pulse record, whose window (the launch pulse's spread echo and the creep's long tail) is long
 * and fitted on a sloping level with the creep's share free: there a plain rise of 0.23 with more line past it
 * was read as a 0.28 end with its creep, 7 m late. A resistor within 1.5 times Z0 is still taken.
 */
const TERMINATED_MAX_RHO_PULSE = 0.2;

const twoWayOf = (ctx: FitContext, delaySamples: number) => Math.max(0, delaySamples) * ctx.twoWayMPerSample;

/** Fit with the model's spread for the event's own distance, once more if the fitted distance moved it. */
function fitAtDistance(ctx: FitContext, win: EventWindow, model: LossModel, zeroPhase = false): ModelFit | null {
  const guess = (win.lo + win.hi) / 2;
  let f = fitWindow(ctx, win, model, twoWayOf(ctx, guess), { zeroPhase });
  if (f && model !== NO_LOSS && Math.abs(f.d - guess) > 0.02 * Math.abs(guess)) f = fitWindow(ctx, win, model, twoWayOf(ctx, f.d), { zeroPhase }) ?? f;
  return f;
}

/**
 * A record whose edges are symmetric about their middle (zero-phase loss) fits the zero-phase shape
 * clearly better than the causal one; its arrival is then sought up to the middle of the edge.
 * The zero-phase fit is kept only when it leaves less than ZERO_PHASE_GAIN of the causal residual.
 */
const ZERO_PHASE_GAIN = 0.5;
/**
 * Smallest ratio of the two edges' heights, either way round, for a two-edge fit to be read as a section:
 * a stretch of other cable between lengths of the same one returns ρ at its start and about −ρ at its end
 * (less by the two-way transmission 1 − ρ² and the line's loss between them).
 */
const SECTION_END_RATIO = 0.5;

/** A fit of `params` free parameters whose residual per point is no more than twice the noise's (four times its variance). */
function withinNoise(ctx: FitContext, f: ModelFit, params: number): boolean {
  const sig = ctx.input.signal;
  const perSample = sig.mode === 'step' ? sig.sigmaU : sig.scaleForPulse * sig.unitArea;
  return f.ss / Math.max(1, f.points - params) <= (4 * perSample ** 2) / f.q;
}

function bestShapeFit(
  ctx: FitContext,
  win: EventWindow,
  model: LossModel,
  m: Measured,
  lossSource: LossSource,
): { f: ModelFit | null; zeroPhase: boolean; causal: ModelFit | null } {
  const f = fitAtDistance(ctx, win, model);
  // Only a loss known beforehand tells the two shapes apart: one estimated from the edges took the causal shape.
  if (lossSource !== 'library' || !f) return { f, zeroPhase: false, causal: f };
  // A causal fit that leaves no more than the noise needs no other shape.
  if (withinNoise(ctx, f, 3)) return { f, zeroPhase: false, causal: f };
  const wide = { ...win, hi: win.hi + Math.max(8, m.riseSamples) };
  const z = fitAtDistance(ctx, wide, model, true);
  if (z && z.ss < ZERO_PHASE_GAIN * f.ss && acceptable(z, m, wide)) return { f: z, zeroPhase: true, causal: f };
  return { f, zeroPhase: false, causal: f };
}

/**
 * The skin term of a cable of unknown loss, from the event that shows its edge
 * best: the erfc parameter whose fit leaves the least residual, searched over
 * the edge's half-height delay t50 = 1.0990·K² on a doubling grid, then refined.
 * Null when the best fit is no better than the lossless one by more than the
 * noise (the loss is not measurable on this trace). A step record that starts
 * after its launch has no edge to take the instrument's rise from: there the
 * nearest event, fitted with the same loss per metre, joins the fit, and the
 * instrument's rise is tried at fractions of that event's own rise.
 * With `prior` (the events fitted once, and the shapes that fit took out of each later window), the earlier
 * events' shapes are taken out of the clearest event's window before its edge is read.
 */
/**
 * The nearest event is a second view of the instrument's rise when its loss spread is clearly smaller than the
 * clearest event's: its two-way length at most this share of the other's (the skin spread's t50 grows with the
 * square of the length, so 0.7 gives it under half the spread).
 */
const NEAR_SPREAD_SHARE = 0.7;
/** Doublings (or halvings) the loss search may go past either end of its grid, while the fit keeps improving. */
const GRID_EXTEND = 8;
/** Share of the edge's residual with the incident stretch's resistance that a fit without it must stay under to leave it out. */
const INCIDENT_R_DROP_SHARE = 0.5;

function estimateSkin(
  ctx0: FitContext,
  events: Measured[],
  resistiveNpPerM = 0,
  prior?: { events: Measured[]; peeled: Peel[] },
): { model: LossModel; from: number[] } | null {
  let ctx = ctx0;
  const fittable = events.map((m, k) => ({ m, k })).filter(({ m }) => !m.blip);
  if (fittable.length === 0) return null;
  const { k, m } = fittable.reduce((a, b) => (Math.abs(b.m.height) * b.m.snr > Math.abs(a.m.height) * a.m.snr ? b : a));
  const instRise = Math.max(1, ctx.input.launch.riseSamples);
  // An edge no wider than the launch shows no loss worth a fit.
  if (m.riseSamples <= 1.5 * instRise + 1) return null;
  // With the events fitted once (`prior`), the fitted shapes of those before this one are taken out of its
  // window, which is then bounded as the line fit bounds it (the earlier events with their fits).
  if (prior) ctx = { ...ctx0, peeled: prior.peeled.filter((p) => p.k !== undefined && p.k < k) };
  const win = eventWindow(ctx, prior ? events.map((e, j) => (j < k ? prior.events[j] : e)) : events, k);
  const d0 = (win.lo + win.hi) / 2;
  const twoWayM = twoWayOf(ctx, d0);
  if (!(twoWayM > 0)) return null;
  const dt = ctx.input.rec.dt;
  const modelFor = (t50Samples: number, r: number): LossModel => {
    const kParam = Math.sqrt((t50Samples * dt) / 1.099);
    return { skinNpPerMRootHz: (kParam * Math.sqrt(Math.PI)) / twoWayM, dielectricNpPerMPerHz: 0, resistiveNpPerM: r };
  };
  // With no launch edge in the record, the instrument's own rise is unknown: it is fitted together with the
  // loss on the clearest event and the nearest one, whose loss spread is smaller by the square of their distances.
  let near: { win: EventWindow; twoWayM: number; rise: number; k: number } | null = null;
  if (ctx.shape.kind === 'synthetic' && ctx.shape.step) {
    const nearest = fittable
      .filter(({ m: e }) => e.onsetIdx >= ctx.input.signal.blindIdx)
      .reduce((a, b) => (b.m.onsetIdx < a.m.onsetIdx ? b : a), fittable[0]);
    if (nearest.k !== k) {
      const nw = eventWindow(ctx, events, nearest.k);
      const nTwo = twoWayOf(ctx, (nw.lo + nw.hi) / 2);
      if (nw.to - nw.from >= 8 && nTwo > 0 && nTwo < NEAR_SPREAD_SHARE * twoWayM)
        near = { win: nw, twoWayM: nTwo, rise: nearest.m.riseSamples, k: nearest.k };
    }
  }
  const search = (c: FitContext, r: number) => {
    const base: LossModel = r > 0 ? { ...NO_LOSS, resistiveNpPerM: r } : NO_LOSS;
    const ssAt = (t50: number) => {
      const model = t50 > 0 ? modelFor(t50, r) : base;
      const opts = { withMiddle: false, maxPoints: ESTIMATE_POINTS, delayTol: ESTIMATE_DELAY_TOL };
      const a = fitWindow(c, win, model, twoWayM, opts)?.ss ?? Infinity;
      return near ? a + (fitWindow(c, near.win, model, near.twoWayM, opts)?.ss ?? Infinity) : a;
    };
    const lossless = ssAt(0);
    const grid = [1 / 16, 1 / 8, 1 / 4, 1 / 2, 1, 2, 4, 8, 16].map((f) => guess * f);
    const scores = grid.map(ssAt);
    let bi = 0;
    for (let i = 1; i < grid.length; i++) if (scores[i] < scores[bi]) bi = i;
    // The guess is read from the edge's 10–90 % rise, which a long skin tail sinking into the noise makes short:
    // on a step record a minimum at either end of the grid lies outside it, and the grid goes on doubling (or
    // halving) while the fit improves. A pulse record's grid is not extended: there the spreads found past it
    // read the loss of long pairs too high and put several of their faults and ends early.
    for (let more = 0; c.shape.step && more < GRID_EXTEND && (bi === grid.length - 1 || bi === 0); more++) {
      const atTop = bi === grid.length - 1;
      const t = atTop ? grid[bi] * 2 : grid[0] / 2;
      const sc = ssAt(t);
      if (!(sc < scores[bi])) break;
      if (atTop) {
        grid.push(t);
        scores.push(sc);
        bi = grid.length - 1;
      } else {
        grid.unshift(t);
        scores.unshift(sc);
        bi = 0;
      }
    }
    const g = goldenMin((x) => ssAt(Math.exp(x)), Math.log(grid[bi] / 2), Math.log(grid[bi] * 2), 0.05, 7);
    const best = g.fx < scores[bi] ? { t50: Math.exp(g.x), ss: g.fx, r } : { t50: grid[bi], ss: scores[bi], r };
    return { lossless, best };
  };
  const guess = Math.max(0.25, (m.riseSamples - instRise) / 28.6);
  const searchAll = (r: number) => {
    let { lossless, best } = search(ctx, r);
    if (near) {
      // The instrument's rise is tried as a quarter, half, three quarters and all of the nearest edge's own rise.
      for (const f of [0.25, 0.5, 0.75, 1]) {
        const sg = Math.max(ctx.shape.sigma, (f * near.rise) / 2.5631);
        const o = search({ ...ctx, shape: { ...ctx.shape, sigma: sg } }, r);
        if (o.lossless < lossless) lossless = o.lossless;
        if (o.best.ss < best.ss) best = o.best;
      }
    }
    return { lossless, best };
  };
  let { lossless, best } = searchAll(resistiveNpPerM);
  // The resistive term read from the incident stretch is tried against the edge's own shape: where the edge
  // fits decisively better without it (the stretch gave more resistance than the cable has, and the skin
  // spread was held too narrow), it is left out.
  if (resistiveNpPerM > 0) {
    const bare = searchAll(0);
    if (bare.lossless < lossless) lossless = bare.lossless;
    if (bare.best.ss < INCIDENT_R_DROP_SHARE * best.ss) best = bare.best;
  }
  const pointsIn = (w: EventWindow) => Math.min(ESTIMATE_POINTS, w.to - w.from);
  const dof = Math.max(1, pointsIn(win) + (near ? pointsIn(near.win) - 3 : 0) - 3);
  return lossFitSignificant(lossless, best.ss, dof) ? { model: modelFor(best.t50, best.r), from: near ? [k, near.k] : [k] } : null;
}

/**
 * An estimated loss is kept only if it fits better than no loss by clearly more than the noise: its residual lower
 * than the lossless one by nine times the residual per degree of freedom. A search whose fits all failed (no finite
 * residual, as when the event's window is empty) has measured nothing, and gives no estimate either.
 */
export function lossFitSignificant(losslessSs: number, bestSs: number, dof: number): boolean {
  if (!(Number.isFinite(losslessSs) && Number.isFinite(bestSs))) return false;
  return losslessSs - bestSs >= 9 * (bestSs / Math.max(1, dof));
}

/** How far the fitted loss must lower the residual of the incident stretch, in units of its noise (residual per degree of freedom). */
const INCIDENT_SIGNIFICANCE = 25;

/**
 * Series loss from the stretch of incident step between the launch and the first event
 * (loss-estimate.ts), when it shows clearly more than noise. Step records only: a pulse
 * record's tail is too faint against drift and quantisation to carry the resistive term.
 */
function incidentLoss(input: EdgeFitInput, events: Measured[]): LossModel | null {
  const { launch: L, signal: sig, rec } = input;
  if (!input.vf || !L.found || sig.mode !== 'step') return null;
  const from = sig.blindIdx + 2 * sig.w0;
  // Only events past the stretch have a height to correct.
  if (!events.some((m) => !m.blip && m.onsetIdx > from)) return null;
  let to = rec.n;
  for (const m of events) if (m.onsetIdx > from) to = Math.min(to, m.onsetIdx - Math.max(8, 2 * m.w));
  const est = estimateFromIncident({
    y: sig.u,
    dt: rec.dt,
    t0Idx: L.onsetInRecord ? L.idx : L.zeroIdx,
    from,
    to,
    vf: input.vf,
  });
  if (!est) return null;
  const dof = Math.max(1, est.points - 3);
  if (!(est.ssFlat - est.ssFit > INCIDENT_SIGNIFICANCE * (est.ssFit / dof))) return null;
  return est.model;
}

/** What in the trace an estimated loss was read from: the rise of the incident step, the shape of the reflections' edges. */
export type LossEvidence = 'incident-step' | 'edge-shape';

export interface LineFitResult {
  events: Measured[];
  lossSource: LossSource;
  loss: LossModel;
  /** For an estimated loss, what it was read from. */
  estimatedFrom?: LossEvidence[];
  /** The velocity factor the loss was read with: its attenuation is then reported through the exact propagation. */
  vf?: number;
}

/**
 * Refit every event (blips excepted) with the line's own response. Events the
 * fit cannot improve keep their reading; the others get the fitted height and
 * `fit` with the delay and its uncertainty.
 */
export function fitLineEdges(input: EdgeFitInput, events: Measured[]): LineFitResult {
  const shape = launchShape(input);
  // The library's figures are read through the line's exact propagation where the speed is known (a thin
  // pair's low-frequency figures lie where it is already diffusive), else as the sum of the loss terms.
  const library = input.loss && input.loss.length > 0 ? (input.vf ? lossModelThroughLine(input.loss, input.vf) : lossModelFromPoints(input.loss)) : null;
  if (!shape || !input.vf) return { events, lossSource: library ? 'library' : 'none', loss: library ?? NO_LOSS, vf: input.vf };
  const ctx: FitContext = { input, shape, twoWayMPerSample: input.vf * SPEED_OF_LIGHT_M_PER_S * input.rec.dt, peeled: [] };
  const incident = library ? null : incidentLoss(input, events);
  let skin = library ? null : estimateSkin(ctx, events, incident?.resistiveNpPerM ?? 0);
  const edgeShape = skin?.model ?? null;
  const estimated = library ? null : (edgeShape ?? incident);
  // The edge's fit may leave the incident stretch's resistance out; the stretch then gave nothing to the estimate.
  const incidentUsed = incident !== null && (edgeShape === null || (edgeShape.resistiveNpPerM ?? 0) > 0);
  const estimatedFrom: LossEvidence[] = [...(incidentUsed ? ['incident-step' as const] : []), ...(edgeShape ? ['edge-shape' as const] : [])];
  const lossSource: LossSource = library ? 'library' : estimated ? 'estimated' : 'none';
  const launchOnset = launchOnsetTimer(input.launch, input.signal);
  // Every event's fit with one loss model, in order; each fitted shape is taken out of the later windows (ctx.peeled).
  // Returns the sections' other ends found on the way.
  const fitAll = (ctx: FitContext, events: Measured[], model: LossModel): Measured[] => {
    const added: Measured[] = [];
    for (const [k, m] of events.entries()) {
      // A blip is two edges, and an event inside the blind zone rides on the launch's own tail: their readings stand.
      if (m.blip || m.onsetIdx < input.signal.blindIdx) continue;
      let win = eventWindow(ctx, events, k);
      if (win.to - win.from < 8) continue;
      const shaped = bestShapeFit(ctx, win, model, m, lossSource);
      let { f, zeroPhase } = shaped;
      let causal = shaped.causal;
      let second: SecondEdge | null = null;
      const atFloor = (g: ModelFit | null) => g !== null && g.d < win.lo + 0.01 * (win.hi - win.lo);
      let extra = 0;
      // A causal fit that runs into the earliest arrival tried (a lossy edge's foot lies further back than
      // its tangent reading suggests) has lost to the zero-phase shape unfairly: both are tried once more
      // with the search reaching a range further back.
      if (zeroPhase && atFloor(shaped.causal)) extra = win.hi - win.lo;
      // A causal fit on the earliest arrival tried found no minimum, and would be dropped for the tangent
      // reading (which a neighbour's tail or a spread pulse echo can put late). With the cable's loss known, the
      // modelled edge says how far back its arrival can lie (earliestArrival): the search reaches back to there, once.
      // Only where the edge is as slow as that loss makes it: a recorded edge sharper than the model's lag from
      // arrival to middle says the library's loss overstates this line's, and its modelled lag would put the
      // arrival early by the difference; the tangent reading stands there.
      else if (!zeroPhase && f && atFloor(f) && lossSource === 'library' && m.riseSamples >= f.middle) {
        const ref = shape.reference === 'launch' ? input.launch.idx : shape.centre;
        const reading = Math.min(m.onsetIdx, shape.reference === 'launch' ? m.onsetIdx : m.t50Idx) - ref;
        extra = win.lo - earliestArrival(reading, f.halfLag, input.launch.riseSamples);
      }
      if (extra > 0) {
        const wider = eventWindow(ctx, events, k, extra);
        if (wider.lo < win.lo - 1) {
          const again = bestShapeFit(ctx, wider, model, m, lossSource);
          if (again.f && acceptable(again.f, m, wider)) {
            ({ f, zeroPhase, causal } = again);
            win = wider;
          }
        }
      }
      // The last event may be a resistive end, read with the line's own impedance (terminatedEnd): with the
      // cable's loss known, whose creep was taken out of the signal and which the reversed creep follows, and
      // with a loss read from the record too. An end near the line's impedance sends back little more than the
      // reversed creep, a slow drop that a plain edge reads far late (a matched end on 600 m of 50 Ω coax, a
      // step record read without the library's loss, was 94 m late and a drop of 0.11); the end's shape
      // (the plain edge plus the reversed creep, both spread by the estimated loss) puts it at its round trip,
      // and is taken only on the same decisive odds over the plain edge and the fault as with a known loss.
      // Not where the loss was read from this event's own edge (estimateSkin), taken there for a plain one: the
      // end's slow reversed creep then passes for a skin spread too wide, and the end's shape with it reads early.
      const endShapeKnown = lossSource === 'library' || (lossSource === 'estimated' && !(skin?.from.includes(k) ?? false));
      const end = endShapeKnown && k === events.length - 1 ? terminatedEnd(ctx, events, k, model, win) : null;
      // An event with more line past it may be a lumped fault, which meets the line's own impedance on both
      // sides (terminatedFit, 'fault'): its echo grows as that impedance does at low frequency, and a plain
      // edge fitted to it reads late. Taken where it explains the window decisively better than the plain fit.
      const fault = !end && f && lossSource === 'library' && k < events.length - 1 ? faultFit(ctx, win, model, f) : null;
      const term = end ?? (fault ? { f: fault, win } : null);
      if (term) {
        f = term.f;
        win = term.win;
        zeroPhase = false;
      } else if (!f || !acceptable(f, m, win)) continue;
      else if (!zeroPhase && lossSource === 'library') {
        // A step of the other sign in the window that one edge cannot follow: fitted beside it (withNeighbourEdge).
        const two = withNeighbourEdge(ctx, win, f);
        if (two && acceptable(two, m, win)) f = two;
      } else if (zeroPhase && lossSource === 'library' && causal) {
        // A section: two edges of opposite sign, each spread by the line over about the section's length, make
        // one slow dip (or bump) that the symmetric shape follows better than one causal edge, and reads as one
        // edge between the two ends. The causal edge with a second one of the other sign beside it
        // (withNeighbourEdge) is taken instead where it leaves less than ZERO_PHASE_GAIN of the symmetric fit's
        // residual (the same margin the symmetric shape had to win by) and the two ends are of a size
        // (SECTION_END_RATIO); both ends are then reported.
        const two = withNeighbourEdge(ctx, win, causal);
        const ratio = two ? Math.abs(two.second.h / two.h) : 0;
        if (two && two.ss < ZERO_PHASE_GAIN * f.ss && ratio >= SECTION_END_RATIO && ratio <= 1 / SECTION_END_RATIO && acceptable(two, m, win)) {
          f = two;
          zeroPhase = false;
          second = two.second;
        }
      }
      // The library's loss is the first cable's: past a change of cable, or on a line whose loss the figures
      // misstate, a plain edge is sharper or slower than the library makes it, and its arrival is read off by the
      // difference. The loss is scaled for this edge where the record decisively says so (lossScaleFit); not
      // for a terminated end or a fault, whose shape is the library's loss's own creep.
      // Pulse records only: a step record's window is fitted on a sloping level (and with the incident
      // step's creep, taken out with the library's loss, under it), which a scaled edge trades against.
      let evModel = model;
      if (!term && !zeroPhase && !ctx.shape.step && lossSource === 'library' && model !== NO_LOSS) {
        const rescaled = lossScaleFit(ctx, win, model, f);
        if (rescaled && acceptable(rescaled.f, m, win)) {
          f = rescaled.f;
          evModel = rescaled.model;
        }
      }
      const probe =
        evModel === NO_LOSS
          ? null
          : term
            ? terminatedFit(ctx, win, scaled(evModel, 1 + LOSS_PROBE), twoWayOf(ctx, f.d))
            : fitWindow(ctx, win, scaled(evModel, 1 + LOSS_PROBE), twoWayOf(ctx, f.d), { withMiddle: false, zeroPhase });
      m.fit = {
        reference: shape.reference,
        lossSource,
        delaySamples: f.d,
        sigmaDelaySamples: f.sigma,
        heightRaw: m.height,
        lossSensitivitySamples: probe ? Math.abs(probe.d - f.d) : 0,
        lossDelaySamples: Math.max(0, f.middle),
        dielectricNpPerMPerHz: evModel.dielectricNpPerMPerHz,
      };
      m.heightRaw = m.height;
      // With no loss model the fitted shape is the launch's own, narrower than an echo the line has spread,
      // and a narrow shape fitted to a spread echo reads its height short; the echo's area, which the skin
      // effect does not change, is the pulse reading's ρ (as the header of this module and analyze say).
      if (!(input.signal.mode === 'pulse' && lossSource === 'none')) m.height = f.h;
      // A pulse's ρ comes from the echo's area, which only the line's DC resistance lowers (skin loss spreads
      // the echo but keeps its area). A loss estimated from the edges' shape alone has no resistive term,
      // so such a reading is not corrected for the loss that lowers it, and says so.
      m.lossCorrected = lossSource !== 'none';
      m.areaUncorrected = input.signal.mode === 'pulse' && lossSource === 'estimated' && !((model.resistiveNpPerM ?? 0) > 0);
      // Timed from the launch's onset (or the trace's zero), so the location step reads the fitted delay.
      const onset = shape.reference === 'launch' ? launchOnset(m.fLo) + f.d : input.launch.zeroIdx + f.d;
      m.onsetIdx = onset;
      if (shape.reference === 'axis') m.t50Idx = onset;
      ctx.peeled.push({ t: f.t, q: f.q, d: f.dq, h: f.h, k });
      // The section's other end, reported as an event of its own unless one is already read there; its edge is
      // taken out of the later windows as the first one's is.
      if (second) {
        const onset2 = shape.reference === 'launch' ? launchOnset(m.fLo) + second.d : input.launch.zeroIdx + second.d;
        const sep = Math.max(1, input.launch.riseSamples, f.middle);
        const taken = events.some((o, j) => j !== k && Math.abs(o.onsetIdx - onset2) < sep);
        if (!taken) {
          added.push({
            ...m,
            onsetIdx: onset2,
            t50Idx: shape.reference === 'axis' ? onset2 : m.t50Idx + (second.d - f.d),
            height: second.h,
            heightRaw: second.h,
            peakDev: second.h,
            blip: false,
            snr: m.snr * Math.abs(second.h / f.h),
            endIdx: Math.max(m.endIdx, onset2 + (m.endIdx - m.onsetIdx)),
            echoPeak: 0,
            levelBefore: m.levelBefore + f.h,
            fit: { ...m.fit, delaySamples: second.d, heightRaw: second.h },
          });
          ctx.peeled.push({ t: f.t, q: f.q, d: second.dq, h: second.h });
        }
      }
      // A fault's creep share is not taken out of the later windows: its template ends with this window and
      // would stand there at its last value, where the share goes on growing past it; the later fits' own
      // sloping baseline follows it instead.
      if (term && !fault) ctx.peeled.push({ t: term.f.tb, q: f.q, d: f.dq, h: term.f.g });
    }
    return added;
  };
  let model = library ?? estimated ?? NO_LOSS;
  // The skin term read from the clearest edge took in the tails of the events before it, which run on into its
  // window (a pulse echo's skin tail most of all) and read as more spread than the edge has: the events are fitted
  // once with that estimate, and the term is read again with the earlier events' fitted shapes taken out.
  // Pulse records only: on a step record's sloping level the second reading put more events off than it set right.
  if (edgeShape && !ctx.shape.step) {
    const trial = events.map((e) => ({ ...e }));
    const first: FitContext = { ...ctx, peeled: [] };
    fitAll(first, trial, model);
    const again = estimateSkin(ctx, events, edgeShape.resistiveNpPerM ?? 0, { events: trial, peeled: first.peeled });
    if (again) {
      model = again.model;
      skin = again;
    }
  }
  const added = fitAll(ctx, events, model);
  if (added.length > 0) {
    events.push(...added);
    events.sort((a, b) => a.onsetIdx - b.onsetIdx);
  }
  return { events, lossSource, loss: model, estimatedFrom, vf: input.vf };
}

/**
 * Odds a second edge in an event's window must win by to be taken into its fit: TERMINATED_ODDS (decisive on
 * Jeffreys' scale) for each place the second edge was tried, since the best of many places is kept (the
 * Bonferroni bound on the look-elsewhere gain).
 */
const NEIGHBOUR_ODDS = TERMINATED_ODDS;
/**
 * Most of the one-edge fit's residual the fit with a second edge may leave: a second edge that takes less
 * is following the one edge's own shape (its foot, its slow settling) rather than a step of its own.
 */
const NEIGHBOUR_SHARE = 0.5;

/**
 * The event's fit `f` with a second edge of the same modelled shape and of the other sign, at another delay
 * in its window, fitted with it. A far event's window on a lossy line is long, and another step in it (a
 * neighbour in its slow skirt, or the line's response where it departs from the single modelled edge) is taken
 * by a one-edge fit as part of the event's own edge, which pulls its arrival and height off. Tried only with
 * the cable's loss known (the edge's shape is then the line's own, and what it leaves is structure, not a
 * shape the model lacks), on step records, and only where the one-edge fit leaves more than the noise
 * (withinNoise). The second edge is of the other sign, so it cannot be the event's own edge split in two, and
 * is sought at least one modelled lag from arrival to middle (and the launch's rise) away from the first. It
 * is taken only where it explains the window decisively better (NEIGHBOUR_ODDS for each place tried), takes
 * at least half of what the one edge left (NEIGHBOUR_SHARE) and stands at least the smallest reported
 * reflection. It is not reported itself here: only the event's delay and height are refitted. Returns the
 * refitted event with the second edge (`second`), or null. Where the event was read with the symmetric shape, the
 * two edges may be a section's two ends, and fitLineEdges reports both (SECTION_END_RATIO).
 */
function withNeighbourEdge(ctx: FitContext, win: EventWindow, f: ModelFit): (ModelFit & { second: SecondEdge }) | null {
  const { rhoMin, launch: L } = ctx.input;
  // A one-edge fit that leaves no more than the noise has nothing more to explain.
  if (!ctx.shape.step || withinNoise(ctx, f, 3)) return null;
  const q = f.q;
  const w = windowData(ctx, win, q);
  const n = w.y.length;
  if (n < 12) return null;
  const t = f.t;
  const cols = w.slope ? 4 : 3;
  const xs = new Float64Array(n);
  for (let k = 0; k < n; k++) xs[k] = (k - (n - 1) / 2) / n;
  let syy = 0;
  for (let k = 0; k < n; k++) syy += w.y[k] * w.y[k];
  const e2 = new Float64Array(n);
  const a = new Float64Array(cols * cols);
  const r = new Float64Array(cols);
  const row = new Float64Array(cols);
  const prof2 = (d1: number): { ss: number; h: number; h2: number } => {
    a.fill(0);
    r.fill(0);
    for (let k = 0; k < n; k++) {
      let c = 0;
      row[c++] = 1;
      if (w.slope) row[c++] = xs[k];
      row[c++] = templateAt(t, w.j0 + k - t.start - d1);
      row[c] = e2[k];
      const yk = w.y[k];
      for (let i = 0; i < cols; i++) {
        r[i] += row[i] * yk;
        for (let j = i; j < cols; j++) a[i * cols + j] += row[i] * row[j];
      }
    }
    for (let i = 0; i < cols; i++) for (let j = 0; j < i; j++) a[i * cols + j] = a[j * cols + i];
    const sol = solveSymmetric(a, r, cols);
    if (!sol) return { ss: Infinity, h: 0, h2: 0 };
    let fit = 0;
    for (let i = 0; i < cols; i++) fit += sol[i] * r[i];
    return { ss: Math.max(0, syy - fit), h: sol[cols - 2], h2: sol[cols - 1] };
  };
  const sep = Math.max(4, (Math.max(0, f.middle) + Math.max(1, L.riseSamples)) / q);
  const lo = win.lo / q;
  const hi = win.hi / q;
  const step = Math.max(1, n / 60);
  let tried = 0;
  let best: { ss: number; h: number; h2: number; d: number; d2: number } | null = null;
  for (let d2 = f.dq - n; d2 <= f.dq + n; d2 += step) {
    // The second edge must change the level inside the window: wholly before or after it, it is the baseline.
    const first = templateAt(t, w.j0 - t.start - d2);
    const last = templateAt(t, w.j0 + n - 1 - t.start - d2);
    if (!(Math.abs(last - first) > 0.5 * Math.abs(templateAt(t, 1e9)))) continue;
    if (Math.abs(d2 - f.dq) < sep) continue;
    for (let k = 0; k < n; k++) e2[k] = templateAt(t, w.j0 + k - t.start - d2);
    const dLo = Math.max(lo, d2 < f.dq ? d2 + sep : lo);
    const dHi = Math.min(hi, d2 > f.dq ? d2 - sep : hi);
    if (!(dHi > dLo)) continue;
    tried++;
    const p = searchDelay(prof2, dLo, dHi, win.sign, 1e-2);
    if (Number.isFinite(p.ss) && Math.sign(p.h2) === -win.sign && (best === null || p.ss < best.ss)) best = { ...p, d2 };
  }
  if (best === null || !(best.ss > 0) || Math.abs(best.h2) < rhoMin || Math.sign(best.h2) === win.sign) return null;
  if ((n / 2) * Math.log(f.ss / best.ss) <= Math.log(NEIGHBOUR_ODDS * tried)) return null;
  if (Math.abs(best.h) > MAX_HEIGHT) return null;
  // The second edge must take at least half of what the one edge left: a smaller gain is the one edge's shape.
  if (best.ss > NEIGHBOUR_SHARE * f.ss) return null;
  const other = { t: { ...t, start: t.start + (best.d2 - best.d) }, g: best.h2 };
  const sigma = delaySigma(w, t, best.d, best.ss, (win.hi - win.lo) / q / 2, undefined, other);
  return { ...f, d: best.d * q, dq: best.d, h: best.h, ss: best.ss, sigma: sigma * q, second: { d: best.d2 * q, dq: best.d2, h: best.h2 } };
}

/** The second edge of a two-edge fit (withNeighbourEdge): its delay (full-rate samples and blocks) and height. */
interface SecondEdge {
  d: number;
  dq: number;
  h: number;
}

/** A lumped fault's fit (terminatedFit, 'fault') where the odds favour it decisively over the plain fit `plain` of the same window. */
function faultFit(ctx: FitContext, win: EventWindow, model: LossModel, plain: ModelFit): (ModelFit & { g: number; tb: Template }) | null {
  const tf = terminatedFit(ctx, win, model, twoWayOf(ctx, plain.d), 'fault');
  return tf && (tf.points / 2) * Math.log(plain.ss / tf.ss) > Math.log(TERMINATED_ODDS) ? tf : null;
}

/**
 * Event k read as a resistive end (terminatedFit) where that shape explains its window clearly better
 * than a plain reflection does. The window reaches back further than the plain fit's: the reversed
 * creep starts slowly, and its tangent reading lies well after the end's round trip.
 */
function terminatedEnd(
  ctx: FitContext,
  events: Measured[],
  k: number,
  model: LossModel,
  win: EventWindow,
): { f: ModelFit & { g: number; tb: Template }; win: EventWindow } | null {
  const m = events[k];
  const wide = eventWindow(ctx, events, k, Math.max(win.hi - win.lo, m.riseSamples));
  if (wide.to - wide.from < 8) return null;
  const guess = (wide.lo + wide.hi) / 2;
  let tf = terminatedFit(ctx, wide, model, twoWayOf(ctx, guess), 'end', true);
  if (tf && Math.abs(tf.d - guess) > 0.02 * Math.abs(guess)) tf = terminatedFit(ctx, wide, model, twoWayOf(ctx, tf.d), 'end', true) ?? tf;
  if (!tf) return null;
  const inside = tf.d > wide.lo + 0.01 * (wide.hi - wide.lo) && tf.d < wide.hi - 0.01 * (wide.hi - wide.lo);
  if (!inside || Math.abs(tf.h) > (ctx.shape.step ? TERMINATED_MAX_RHO : TERMINATED_MAX_RHO_PULSE) || Math.sign(terminatedSeen(tf, wide)) !== Math.sign(m.height)) return null;
  // Decisively better than a plain edge, and than a fault with the line going on past it.
  const others = [
    fitWindow(ctx, wide, model, twoWayOf(ctx, tf.d)),
    terminatedFit(ctx, wide, model, twoWayOf(ctx, tf.d), 'fault', true),
    ...(ctx.shape.step ? [] : [terminatedFit(ctx, wide, model, twoWayOf(ctx, tf.d), 'edge', true)]),
  ];
  if (!others.every((other) => !other || (tf.points / 2) * Math.log(other.ss / tf.ss) > Math.log(TERMINATED_ODDS))) return null;
  // A shape that explains its window to the noise is taken on those odds. Where it leaves more, the window
  // may hold more than an end (a neighbour, a change of cable, a loss the library misstates), and the odds
  // between two wrong shapes say little: there the end's shape is taken only where it leaves no more than
  // TERMINATED_DOMINANT_SHARE of what each other shape leaves. What a window holding something else leaves
  // is of the size of what the other shapes leave; what is left here is the model's own small misfit,
  // which a clean record shows above its noise.
  if (!withinNoise(ctx, tf, 4) && !others.every((other) => !other || tf.ss <= TERMINATED_DOMINANT_SHARE * other.ss)) return null;
  return { f: tf, win: wide };
}

/** Scales of the library's loss a single edge's fit tries (lossScaleFit), from none to three times it. */
const LOSS_SCALES = [0, 0.25, 0.5, 0.7, 1.4, 2, 3];

/**
 * The edge `f` (fitted with the library's loss) fitted again with that loss scaled, for the scale whose fit
 * leaves the least residual: each of LOSS_SCALES, then the geometric midpoints between the best and its neighbours (the library's own scale, 1, among them). The library's
 * figures are those of the cable at the port; past a change to another cable (a thicker pair spliced on) the
 * line loses less or more, and an edge fitted with the first cable's loss is read early or late by the
 * difference in its modelled lag. Taken only where the library's loss leaves more than the noise
 * (withinNoise), the scaled loss explains the window to the noise, and it does so decisively: by
 * TERMINATED_ODDS for each scale tried (the best of many is kept; the Bonferroni bound on the look-elsewhere
 * gain), the likelihood ratio of Gaussian residuals of unknown spread being (S_library/S_scaled)^(N/2). A
 * window the library's loss leaves above the noise may hold more than one edge (a neighbour's tail, a
 * section's other end), and a scale that only follows that better moves the reading without cause; one that
 * leaves no more than the noise is the edge's own. Null otherwise.
 */
function lossScaleFit(ctx: FitContext, win: EventWindow, model: LossModel, f: ModelFit): { f: ModelFit; model: LossModel } | null {
  let best: { f: ModelFit; k: number } | null = null;
  let tried = 0;
  const tryScale = (k: number) => {
    tried++;
    const g = fitAtDistance(ctx, win, k === 0 ? NO_LOSS : scaled(model, k));
    if (g && Number.isFinite(g.ss) && (!best || g.ss < best.f.ss)) best = { f: g, k };
  };
  for (const k of LOSS_SCALES) tryScale(k);
  const b0 = best as { f: ModelFit; k: number } | null;
  if (!b0) return null;
  // The best scale's neighbours among those tried and the library's own (1).
  const all = [...LOSS_SCALES, 1].sort((a, b) => a - b);
  const i = all.indexOf(b0.k);
  if (i > 0) tryScale(all[i - 1] > 0 ? Math.sqrt(all[i - 1] * b0.k) : b0.k / 2);
  if (i < all.length - 1) tryScale(b0.k > 0 ? Math.sqrt(all[i + 1] * b0.k) : all[i + 1] / 2);
  const b = best as { f: ModelFit; k: number } | null;
  if (!b || !(b.f.ss < f.ss)) return null;
  if ((b.f.points / 2) * Math.log(f.ss / b.f.ss) <= Math.log(TERMINATED_ODDS * tried)) return null;
  // Only where the library's loss leaves more than the noise and the scaled one explains the window to it.
  if (withinNoise(ctx, f, 3) || !withinNoise(ctx, b.f, 4)) return null;
  return { f: b.f, model: b.k === 0 ? NO_LOSS : scaled(model, b.k) };
}

const scaled = (m: LossModel, k: number): LossModel => ({
  skinNpPerMRootHz: m.skinNpPerMRootHz * k,
  dielectricNpPerMPerHz: m.dielectricNpPerMPerHz * k,
  resistiveNpPerM: (m.resistiveNpPerM ?? 0) * k,
});

/**
 * The earliest arrival an edge read by the tangent construction can have, in samples of delay: the
 * construction lands before the edge's middle (on the skin effect's erfc edge, 0.04–0.5·a² before the
 * arrival for a low point of 10–30 %, while the middle is 1.1·a² after it; onset.ts), and the launch it is
 * timed from was read by the same construction, good to its own rise. So the arrival lies no further before the reading than
 * the modelled edge's lag from arrival to middle (`middleLag`, the line's share only) plus the launch's rise.
 */
export function earliestArrival(reading: number, middleLag: number, launchRise: number): number {
  return reading - Math.max(0, middleLag) - Math.max(1, launchRise);
}

/** A fit is kept when its delay is inside the searched range and its height is a believable correction of the reading. */
function acceptable(f: ModelFit, m: Measured, win: EventWindow): boolean {
  const inside = f.d > win.lo + 0.01 * (win.hi - win.lo) && f.d < win.hi - 0.01 * (win.hi - win.lo);
  const raw = Math.abs(m.height);
  const h = Math.abs(f.h);
  return inside && Math.sign(f.h) === Math.sign(m.height) && h >= 0.5 * raw && h <= Math.max(1.3, 1.3 * raw);
}

/** Round trip of a fitted event in samples, from the launch or from a manual time zero. */
export function fittedRoundTrip(fit: LineFit, zeroOverride: number | null, launchOnset: number, zeroIdx: number): number {
  if (zeroOverride === null) return fit.delaySamples;
  return fit.delaySamples + (fit.reference === 'launch' ? launchOnset : zeroIdx) - zeroOverride;
}

/** How many dB the cable's loss had lowered an event's reading (null where the reading was not corrected). */
export function pathLossDb(m: Measured): number | null {
  if (!m.fit || !m.lossCorrected || !(Math.abs(m.fit.heightRaw) > 0)) return null;
  return 20 * Math.log10(Math.abs(m.height) / Math.abs(m.fit.heightRaw));
}

/** The frequencies the loss used is reported at. */
const SUMMARY_FREQUENCIES_HZ = [1e6, 1e7, 1e8];

/** Where the loss came from (and, estimated, from what), and the loss itself at a few frequencies, for the analysis. */
export function lossSummary(r: LineFitResult): {
  lossSource: LossSource;
  lossEstimatedFrom?: LossEvidence[];
  lossDbPer100m: Array<{ frequencyHz: number; dbPer100m: number }>;
} {
  return {
    lossSource: r.lossSource,
    ...(r.lossSource === 'estimated' ? { lossEstimatedFrom: r.estimatedFrom ?? [] } : {}),
    lossDbPer100m:
      r.lossSource === 'none'
        ? []
        : SUMMARY_FREQUENCIES_HZ.map((f) => ({
            frequencyHz: f,
            dbPer100m: Number((r.vf ? exactAttenuationNpPerM(r.loss, f, r.vf) * 100 * DB_PER_NEPER : attenuationDbPer100m(r.loss, f)).toPrecision(4)),
          })),
  };
}
