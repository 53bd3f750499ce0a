/**
 * Classification: the kind of each event and the impedance it shows.
 *
 * ρ is first referred to the wave that reached the event: each earlier lumped
 * fault passed it, out and back. An open or a short reflects (nearly)
 * everything; a lossy far end that is still settling when the record or the
 * next event cuts it short counts as one from half that. The impedance is
 * Z = Z0 (1 + ρ)/(1 − ρ) (D. M. Pozar, "Microwave Engineering", 4th ed.,
 * eq. 2.35), reported for step traces only.
 */
import type { ReflectionType } from '../schemas/trace-analysis';
import { impedanceFromReflection } from './impedance';
import type { Measured, Mode } from './steps';

/** Transmission of the wave reaching later events, updated as each event is passed. */
export class PathTransmission {
  private t = 1;

  /** ρ as the wave that reached this event would read it. */
  local(rho: number): number {
    return rho / Math.max(0.05, this.t);
  }

  pass(m: Measured, rhoLocal: number): void {
    if (!m.blip) this.t *= (1 - Math.min(0.95, Math.abs(rhoLocal))) ** 2;
  }
}

export function classifyEvent(m: Measured, rhoLocal: number, isLast: boolean): ReflectionType {
  const settling = m.stillMoving > 0.05;
  if (!m.blip && (rhoLocal >= 0.75 || (isLast && rhoLocal >= 0.35) || (isLast && settling && rhoLocal >= 0.3))) return 'open';
  if (!m.blip && (rhoLocal <= -0.75 || (isLast && rhoLocal <= -0.45) || (isLast && settling && rhoLocal <= -0.3))) return 'short';
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
