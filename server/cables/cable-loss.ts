import type { AttenuationPoint, LineConstants, PulseVf } from '../../shared/schemas/cables';

/** 20·log10(e): nepers to decibels. */
const DB_PER_NEPER = 20 / Math.LN10;

/** A recorded pulse width matches a trace's when they differ by at most this fraction (instrument settings are discrete). */
export const PULSE_WIDTH_MATCH = 0.05;

/**
 * Attenuation of a line from its constants at frequency f: α = Re √((R + jωL')(G + jωC)),
 * with R = R_dc + k_s√f and the skin effect's internal reactance k_s√f added to ωL
 * (a good conductor's surface impedance R_s(1 + j), D. M. Pozar, "Microwave
 * Engineering", 4th ed., §1.7 and §2.7). Returns dB per 100 m.
 */
export function attenuationAt(lc: Partial<LineConstants>, frequencyHz: number): number {
  const l = lc.lHPerM ?? 0;
  const c = lc.cFPerM ?? 0;
  const w = 2 * Math.PI * frequencyHz;
  const skin = (lc.skinOhmPerMRootHz ?? 0) * Math.sqrt(frequencyHz);
  const zRe = (lc.rDcOhmPerM ?? 0) + skin;
  const zIm = w * l + skin;
  const yRe = (lc.gSPerM ?? 0) + w * c * (lc.lossTangent ?? 0);
  const yIm = w * c;
  // γ² = Z·Y; α = Re √(γ²).
  const re = zRe * yRe - zIm * yIm;
  const im = zRe * yIm + zIm * yRe;
  const alphaNpPerM = Math.sqrt((Math.hypot(re, im) + re) / 2);
  return alphaNpPerM * DB_PER_NEPER * 100;
}

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
 * override from the upload still wins over both.
 */
export function libraryAnalysisOptions(
  cable: { vf: number } & LibraryLoss,
  pulseWidthNs: number | undefined,
  vfOverride: number | undefined,
): { vf: number; loss?: Array<{ dbPer100m: number; frequencyHz: number }> } {
  const loss = engineLoss(cable);
  const vf = vfOverride ?? pulseWidthVf(cable.pulseVfs ?? [], pulseWidthNs)?.vf ?? cable.vf;
  return { vf, ...(loss ? { loss } : {}) };
}
