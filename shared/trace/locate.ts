/**
 * Location: round-trip time from the launch's onset to each event's onset,
 * and distance d = VF·c·t/2 (the wave goes out and back; see
 * shared/cable/propagation.ts), less any test lead.
 */
import { measureOnset } from './onset';
import { boxcar } from './stats';
import type { Launch, Measured, TraceRecord, WorkingSignal } from './steps';

export interface Timebase {
  rec: TraceRecord;
  launch: Launch;
  signal: WorkingSignal;
  /** Launch onset for a given low fraction (onset.ts). */
  launchOnset: (fLo: number) => number;
  /** A manual zero, as a sample index, replacing the launch. */
  zeroOverride: number | null;
  /**
   * Reference-plane traces: onset is earlier than the (zero-phase) reflection's
   * centre by the instrument edge's own onset offset.
   */
  zeroShift: number;
}

/**
 * The instrument edge's onset offset, taken from the sharpest event, for traces whose
 * time zero is the axis zero at the launch's 50 % point. A pulse record's echoes are
 * timed on its running integral, whose ramp starts at the echo's own 50 % point, so
 * they need none.
 */
export function referencePlaneShift(L: Launch, merged: Measured[]): number {
  if (L.onsetInRecord || merged.length === 0 || L.mode === 'pulse') return 0;
  return Math.min(...merged.map((m) => Math.max(0, m.t50Idx - m.onsetIdx)));
}

/** Index of time zero for an event timed with low fraction fLo. */
export function zeroIndex(tb: Timebase, fLo: number): number {
  return tb.zeroOverride ?? tb.launchOnset(fLo) - tb.zeroShift;
}

/**
 * A short section in a pulse trace echoes as a doublet, whose integral is a pulse
 * rather than a step; time its first lobe against the launch pulse itself instead.
 */
function doubletTiming(tb: Timebase, m: Measured): { onsetIdx: number; zeroIdx: number } | null {
  const { launch: L, signal: sig } = tb;
  const n = tb.rec.n;
  const ps = boxcar(sig.pulseRaw, sig.smoothW);
  const from = Math.max(0, Math.floor(m.onsetIdx - m.w));
  const to = Math.min(n, Math.ceil(m.onsetIdx + 3 * Math.max(m.w, L.riseSamples)));
  let iPk = from;
  for (let i = from; i < to; i++) if (Math.sign(m.height) * ps[i] > Math.sign(m.height) * ps[iPk]) iPk = i;
  const pk = ps[iPk];
  if (!(Math.sign(pk) === Math.sign(m.height) && Math.abs(pk) > 0)) return null;
  const zero = () => 0;
  const onsetIdx = measureOnset(ps, iPk, zero, pk, m.fLo, from, iPk).onset;
  let zeroIdx = zeroIndex(tb, m.fLo);
  let lPk = L.idx;
  for (let i = L.idx; i < Math.min(n, L.settleIdx); i++) if (ps[i] > ps[lPk]) lPk = i;
  if (tb.zeroOverride === null)
    zeroIdx = measureOnset(ps, lPk, zero, ps[lPk], m.fLo, Math.max(0, L.idx - 4 * L.riseSamples), lPk).onset;
  return { onsetIdx, zeroIdx };
}

/** Round trip of an event, in samples. */
export function roundTripSamples(tb: Timebase, m: Measured): number {
  if (tb.signal.mode === 'pulse' && m.blip && tb.launch.found && tb.launch.onsetInRecord) {
    const d = doubletTiming(tb, m);
    if (d) return d.onsetIdx - d.zeroIdx;
  }
  return m.onsetIdx - zeroIndex(tb, m.fLo);
}
