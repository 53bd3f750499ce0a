/**
 * Edge fit: the arrival time and height of each detected event.
 *
 * Today: the level just before the event, the level after it (widened until a
 * lossy edge stops rising), and its onset by the tangent construction of
 * onset.ts. This is the seam where a fit of the line's own (loss-spread) edge
 * shape replaces the construction.
 */
import { measureOnset, type Onset } from './onset';
import { lineFit, sampleMedian } from './stats';
import type { Candidate, Launch, Measured, TraceRecord, WorkingSignal } from './steps';

export interface EdgeFitInput {
  rec: TraceRecord;
  launch: Launch;
  signal: WorkingSignal;
  /** Smallest |ρ| kept. */
  rhoMin: number;
}

const lowFraction = (sigmaLocal: number, height: number) => Math.min(0.3, Math.max(0.1, (3 * sigmaLocal) / Math.abs(height)));

/**
 * A lossy edge keeps rising long after the filter window: widen the level window
 * to a few times the edge's own 10–90 % time until the level stops changing.
 */
function settleLossyEdge(
  us: Float64Array,
  first: { r: Onset; height: number; fLo: number },
  base: number,
  w: number,
  limit: number,
  preFrom: number,
  sigmaLocal: number,
): { r: Onset; height: number; fLo: number; settleTo: number | null; stillMoving: number } {
  let { r, height, fLo } = first;
  let settleTo: number | null = null;
  let stillMoving = 0;
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
    height = hNext;
    fLo = lowFraction(sigmaLocal, height);
    r = measureOnset(us, a, () => base, height, fLo, preFrom, Math.min(n - 1, b));
    if (change < 0.02 || b >= limit) break;
  }
  return { r, height, fLo, settleTo, stillMoving };
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
  const baseLevel = lineFit(us, preFrom, Math.max(preFrom + 1, preTo))(preTo);
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
    const s = settleLossyEdge(us, { r, height, fLo }, baseLevel, w, limit, preFrom, sigmaLocal);
    ({ r, height, fLo, stillMoving } = s);
    if (s.settleTo !== null) settleTo = s.settleTo;
  }
  return {
    onsetIdx: r.onset,
    t50Idx: r.t50,
    riseSamples: r.rise,
    height,
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
