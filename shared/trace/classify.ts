/**
 * Classification: each event's own reflection coefficient, its kind, and the
 * impedance it shows.
 *
 * The height read at the instrument is the event's own ρ times the round-trip
 * transmission of everything in front of it. A lumped resistor passes 1 − |ρ|
 * each way (series R: 2Z0/(2Z0 + R); shunt R: 2R/(2R + Z0)), (1 − |ρ|)² out and
 * back; a change of line impedance passes 1 + ρ one way and 1 − ρ the other,
 * T·T′ = 1 − ρ² (D. M. Pozar, "Microwave Engineering", 4th ed., §2.3). One edge
 * cannot tell the two apart, so an edge is taken as a change of line when it
 * starts a section (an opposite edge of like size follows: a wet stretch, a
 * splice, a bridged tap's junction and stub end), whether or not more line shows
 * after it, and as a lumped fault otherwise; the section's closing edge passes 1 − ρ² as well. The pair's bounce tells a shunt or series fault
 * in front of the end from a section when the closing edge is the last one: the end's wave
 * comes back off a lumped fault with the fault's own sign, off a section's start (seen from
 * within) with the opposite sign (L. V. Bewley, "Traveling Waves on Transmission Systems",
 * 2nd ed., ch. 3).
 *
 * Bands on the event's own ρ (common practice): open at ρ ≥ +0.8, short at
 * ρ ≤ −0.8, otherwise an impedance rise or drop. A last event (nothing real
 * after it) whose edge is visibly spread by loss is typed an open from ρ ≥ +0.35
 * or a short from ρ ≤ −0.45 (±0.3 while it is still rising when the record
 * ends; +0.5 and −0.55 when its loss is corrected), since loss takes more of a
 * far end than a correction can be sure to give back; a partial fault with the
 * line still visible beyond it keeps the strict bands. A last event read where the
 * instrument's source reflection is unknown (none measured, and the record ends
 * before the event's own second arrival off the source could show it) is read
 * through an unknown 1 + ρ_s of at least 2/3, so it is an open or a short from
 * |ρ| ≥ 0.8 · 2/3. The impedance is
 * Z = Z0 (1 + ρ)/(1 − ρ) (Pozar eq. 2.35), for step traces only.
 */
import type { ReflectionType } from '../schemas/trace-analysis';
import { impedanceFromReflection } from './impedance';
import type { Measured, Mode } from './steps';

export const OPEN_MIN_RHO = 0.8;
export const SHORT_MAX_RHO = -0.8;

export interface OwnReflection {
  /** The event's own ρ, in [−1, 1]. */
  rho: number;
  /** Round-trip transmission of everything in front of it. */
  transmission: number;
  isLast: boolean;
}

const clampRho = (r: number) => Math.max(-1, Math.min(1, r));

/** The working level a bounce is read from, and its noise (steps.ts WorkingSignal). */
export interface BounceProbe {
  u: Float64Array;
  mode: Mode;
  /** Step records: noise of u per sample. */
  sigmaU: number;
  /** Pulse records: noise of one pulse-domain sample in u units (u is their running sum). */
  scaleForPulse: number;
  w0: number;
  noiseExcess: (w: number) => number;
}

/**
 * The wave merged[j] sends back meets merged[k] again on its way, and the share k reflects goes back
 * to j and returns one gap t_j − t_k later. A lumped fault reflects it with its own sign, seen from
 * either side; a change of line reflects it with the opposite sign, seen from within. Returns the
 * change of u there (signed so that j's own sign is positive), its noise, and what a lumped k in
 * front of an end at j would give, −|A_j|·|ρ_k|·|ρ_j|; null where the record does not hold it clear
 * of j's own edge and of any later real edge.
 */
function bounceAfter(
  merged: Measured[],
  primary: boolean[],
  k: number,
  j: number,
  probe: BounceProbe,
): { delta: number; sigma: number; lumped: number } | null {
  const mk = merged[k];
  const mj = merged[j];
  const gap = mj.onsetIdx - mk.onsetIdx;
  const at = Math.round(mj.onsetIdx + gap);
  // The copy has travelled further than j's own wave and is spread more, up to as the square of the path (skin loss).
  const grow = (mj.onsetIdx + gap) / Math.max(1, mj.onsetIdx);
  const spread = Math.ceil(Math.max(probe.w0, mj.riseSamples) * grow * grow);
  const w = Math.ceil(Math.max(2 * probe.w0, mj.riseSamples));
  const from = at - w;
  const to = at + spread + w;
  if (from <= mj.onsetIdx + mj.riseSamples || to >= probe.u.length) return null;
  for (let l = j + 1; l < merged.length; l++) if (primary[l] && merged[l].onsetIdx <= to && merged[l].endIdx >= from) return null;
  let before = 0;
  let after = 0;
  for (let i = from; i < at; i++) before += probe.u[i];
  for (let i = at + spread; i < to; i++) after += probe.u[i];
  const delta = ((after - before) / w) * Math.sign(mj.height);
  // Two means of w samples: white noise on a step record; on a pulse record u is a running sum, so
  // its noise grows with the samples between the two windows.
  const sigma =
    probe.mode === 'step'
      ? probe.sigmaU * Math.sqrt(2 / w) * probe.noiseExcess(w)
      : probe.scaleForPulse * Math.sqrt(spread + (2 * w) / 3) * probe.noiseExcess(w);
  const rk = Math.min(0.95, Math.abs(mk.height));
  const lumped = -Math.abs(mj.height) * rk * Math.min(1, Math.abs(mj.height) / (1 - rk) ** 2);
  return { delta, sigma, lumped };
}

/**
 * A closer larger than this share of its start stays a section's: a bridged tap's stub end, which the
 * line shows just as an open behind a shunt of the line's own impedance, reads (2/3)²/(1/3) = 4/3 of
 * its junction less the stub's loss, and is reported through the junction as a tap.
 */
const LUMPED_RATIO_MAX = 1.2;

/**
 * Is merged[k] the first edge of a section: is the next real edge an opposite one of like size?
 * Not where that edge is the last one, a lumped k would make it an end (ρ ≥ 0.8 through (1 − |ρ_k|)²),
 * it is not larger than a tap's stub end through little loss would read, and its bounce off k is
 * seen with k's sign, standing 2.5 deviations out and at least half what a lumped k gives, or falls past the
 * record's end. A closer spread by loss is an end through a lumped k from the wider bands of classifyEvent.
 */
function startsSection(merged: Measured[], primary: boolean[], k: number, probe?: BounceProbe, launchRise = 1): boolean {
  const m = merged[k];
  for (let j = k + 1; j < merged.length; j++) {
    if (!primary[j]) continue;
    const o = merged[j];
    if (Math.sign(o.height) === Math.sign(m.height)) return false;
    const ratio = Math.abs(o.height) / Math.abs(m.height);
    if (!(ratio > 0.6 && ratio < 1.4)) return false;
    const last = merged.every((later, l) => l <= j || !primary[l] || Math.abs(later.height) < 0.1 * Math.abs(o.height));
    const rk = Math.min(0.95, Math.abs(m.height));
    const [openBand, shortBand] = endBands(o, launchRise);
    const ifLumped = o.height / (1 - rk) ** 2;
    const endIfLumped = ifLumped >= openBand || ifLumped <= shortBand;
    if (probe && last && ratio <= LUMPED_RATIO_MAX && endIfLumped) {
      const b = bounceAfter(merged, primary, k, j, probe);
      if (b && b.delta < -2.5 * b.sigma && b.delta < b.lumped / 2) return false;
      // Where the record ends before that bounce could come back, nothing shows a section running on past
      // the record with the line behind it unseen; a fault in front of the end is the usual reading (common
      // practice: a last edge that would make an open or a short through a lumped fault is read as the end).
      if (!b) return false;
    }
    return true;
  }
  return false;
}

/**
 * Each event's own ρ, referred to the wave that reached it, and whether anything real
 * follows it. A mismatched source (ρ_s) shows every returning wave as (1 + ρ_s) of it.
 * `probe`: the record's working level, to tell a lumped fault in front of the end from a section's start.
 */
export function ownReflections(
  merged: Measured[],
  isEcho: boolean[],
  sourceRho = 0,
  probe?: BounceProbe,
  launchRise = 1,
): OwnReflection[] {
  const primary = isEcho.map((e) => !e);
  const atPort = 1 + sourceRho;
  let t = 1;
  const closers = new Set<number>();
  return merged.map((m, k) => {
    const transmission = t;
    const rho = clampRho(m.height / atPort / Math.max(0.05, transmission));
    const isLast = merged.every((later, l) => l <= k || isEcho[l] || Math.abs(later.height) < 0.1 * Math.abs(m.height));
    if (primary[k]) {
      const r = Math.min(0.95, Math.abs(rho));
      if (m.blip) t *= (1 - r * r) ** 2;
      else if (closers.has(k)) t *= 1 - r * r;
      else if (startsSection(merged, primary, k, probe, launchRise)) {
        t *= 1 - r * r;
        // The section's closer is a change of line too: it passes 1 − ρ² as its start does.
        const j = merged.findIndex((_, l) => l > k && primary[l]);
        if (j > 0) closers.add(j);
      } else t *= (1 - r) ** 2;
    }
    return { rho, transmission, isLast };
  });
}

/**
 * The least share of a wave that a mismatched source passes into the instrument, 1 + ρ_s, for a
 * source within a factor of two of the line's impedance (R_s ≥ Z0/2: ρ_s ≥ −1/3), common practice
 * for an instrument matched to its cable class (e.g. a 50 Ω instrument on 100 Ω pair).
 */
export const SOURCE_SHARE_MIN = 2 / 3;

/**
 * The ρ bands a last event is typed an open or a short from: ±0.8, or, for an edge visibly spread by
 * loss (rise at least four launch rises), the wider bands of classifyEvent.
 */
function endBands(m: Measured, launchRise: number): [number, number] {
  if (m.riseSamples < 4 * Math.max(1, launchRise)) return [OPEN_MIN_RHO, SHORT_MAX_RHO];
  return m.lossCorrected ? [0.5, -0.55] : [0.35, -0.45];
}

/**
 * Open, short, or an impedance rise or drop, from the event's own ρ; `recordEnd` is the record's
 * last sample. `sourceUnseen`: the record ends before this edge's wave could come back a second
 * time off the instrument's source and no source reflection was measured otherwise, so the share
 * 1 + ρ_s the source passes is unknown and a last event's ρ is known only to within it.
 */
export function classifyEvent(
  m: Measured,
  own: OwnReflection,
  launchRiseSamples: number,
  recordEnd = Infinity,
  sourceUnseen = false,
): ReflectionType {
  const rho = own.rho;
  if (!m.blip) {
    if (rho >= OPEN_MIN_RHO) return 'open';
    if (rho <= SHORT_MAX_RHO) return 'short';
    if (own.isLast && sourceUnseen) {
      if (rho >= OPEN_MIN_RHO * SOURCE_SHARE_MIN) return 'open';
      if (rho <= SHORT_MAX_RHO * SOURCE_SHARE_MIN) return 'short';
    }
    // Still rising where its level window meets the record's end: the reading is cut short. A level
    // still moving inside the record is the next feature arriving (one too weak to report), not this edge.
    const settling = m.stillMoving > 0.05 && m.endIdx >= recordEnd - 2;
    const spread = m.riseSamples >= 4 * Math.max(1, launchRiseSamples) || settling;
    if (own.isLast && spread) {
      // A loss-corrected ρ has had most of the loss given back, so it must come nearer ±1.
      const [openMin, shortMax] = m.lossCorrected ? [0.5, -0.55] : [0.35, -0.45];
      if (rho >= openMin || (settling && rho >= 0.3)) return 'open';
      if (rho <= shortMax || (settling && rho <= -0.3)) return 'short';
    }
  }
  return m.height > 0 ? 'impedance-rise' : 'impedance-drop';
}

/**
 * An impedance is only meaningful for a step trace, a known Z0, and an event that is
 * neither a blip nor an open/short (whose Z is ∞ or 0, whatever the lossy ρ reads).
 */
export function impedanceOf(mode: Mode, z0: number | null, m: Measured, type: ReflectionType, rho: number): number | null {
  if (mode !== 'step' || z0 === null || m.blip || type === 'open' || type === 'short') return null;
  const z = impedanceFromReflection(rho, z0);
  return Number.isFinite(z) ? z : null;
}
