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
 * after it, and as a lumped fault otherwise.
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

/** Is merged[k] the first edge of a section: is the next real edge an opposite one of like size? */
function startsSection(merged: Measured[], primary: boolean[], k: number): boolean {
  const m = merged[k];
  for (let j = k + 1; j < merged.length; j++) {
    if (!primary[j]) continue;
    const o = merged[j];
    if (Math.sign(o.height) === Math.sign(m.height)) return false;
    const ratio = Math.abs(o.height) / Math.abs(m.height);
    return ratio > 0.6 && ratio < 1.4;
  }
  return false;
}

/**
 * Each event's own ρ, referred to the wave that reached it, and whether anything real
 * follows it. A mismatched source (ρ_s) shows every returning wave as (1 + ρ_s) of it.
 */
export function ownReflections(merged: Measured[], isEcho: boolean[], sourceRho = 0): OwnReflection[] {
  const primary = isEcho.map((e) => !e);
  const atPort = 1 + sourceRho;
  let t = 1;
  return merged.map((m, k) => {
    const transmission = t;
    const rho = clampRho(m.height / atPort / Math.max(0.05, transmission));
    const isLast = merged.every((later, l) => l <= k || isEcho[l] || Math.abs(later.height) < 0.1 * Math.abs(m.height));
    if (primary[k]) {
      const r = Math.min(0.95, Math.abs(rho));
      if (m.blip) t *= (1 - r * r) ** 2;
      else t *= startsSection(merged, primary, k) ? 1 - r * r : (1 - r) ** 2;
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
