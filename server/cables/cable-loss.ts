import type { AttenuationPoint, LineConstants, PulseVf } from '../../shared/schemas/cables';
import { attenuationFromLineConstants } from '../../shared/trace/loss';

/** A recorded pulse width matches a trace's when they differ by at most this fraction (instrument settings are discrete). */
export const PULSE_WIDTH_MATCH = 0.05;

/** Attenuation from line constants, dB per 100 m: the engine's own formula (shared/trace/loss.ts). */
export const attenuationAt = (lc: Partial<LineConstants>, frequencyHz: number) => attenuationFromLineConstants(lc, frequencyHz);

/** The frequencies at which the line constants are turned into points for the engine: one per decade, 10 kHz to 1 GHz. */
const CONSTANT_FREQUENCIES_HZ = [1e4, 1e5, 1e6, 1e7, 1e8, 1e9];

/** The library's loss and pulse-width VFs, as an analysis takes them (a CableType row carries them all). */
export type LibraryLoss = Partial<LineConstants> & { attenuation?: AttenuationPoint[]; pulseVfs?: PulseVf[] };

/** The recorded VF whose pulse width matches, the closest if several do; null when none does. */
export function pulseWidthVf(pulseVfs: readonly PulseVf[], pulseWidthNs: number | undefined): PulseVf | null {
  if (pulseWidthNs === undefined || !(pulseWidthNs > 0)) return null;
  let best: PulseVf | null = null;
  for (const p of pulseVfs) {
    const off = Math.abs(p.pulseWidthNs / pulseWidthNs - 1);
    if (off <= PULSE_WIDTH_MATCH && (!best || off < Math.abs(best.pulseWidthNs / pulseWidthNs - 1))) best = p;
  }
  return best;
}

/**
 * The cable's loss for the trace engine, as attenuation points in Hz: the
 * library's own points where it has them, else points worked out from its line
 * constants; undefined when it records neither.
 */
export function engineLoss(cable: LibraryLoss): Array<{ dbPer100m: number; frequencyHz: number }> | undefined {
  if (cable.attenuation?.length)
    return cable.attenuation.map((p) => ({ dbPer100m: p.dbPer100m, frequencyHz: p.frequencyMhz * 1e6 }));
  if (cable.lHPerM && cable.cFPerM)
    return CONSTANT_FREQUENCIES_HZ.map((f) => ({ dbPer100m: attenuationAt(cable, f), frequencyHz: f }));
  return undefined;
}

/**
 * What the library adds to an analysis: the VF (the one measured at the trace's
 * pulse width when recorded, else the entry's) and the loss. An explicit VF
 * override from the upload still wins over both. A pulse-width VF is passed with
 * its width, so the engine knows it already holds the line's dispersion.
 */
export function libraryAnalysisOptions(
  cable: { vf: number } & LibraryLoss,
  pulseWidthNs: number | undefined,
  vfOverride: number | undefined,
): { vf: number; loss?: Array<{ dbPer100m: number; frequencyHz: number }>; vfPulseWidthNs?: number } {
  const loss = engineLoss(cable);
  const atWidth = vfOverride === undefined ? pulseWidthVf(cable.pulseVfs ?? [], pulseWidthNs) : null;
  return {
    vf: vfOverride ?? atWidth?.vf ?? cable.vf,
    ...(loss ? { loss } : {}),
    ...(atWidth ? { vfPulseWidthNs: atWidth.pulseWidthNs } : {}),
  };
}
