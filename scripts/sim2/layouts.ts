/**
 * CSV layouts for the second simulator's traces: every layout of
 * scripts/sim/layouts.ts (written by its own writer), plus pulse exports that
 * start at 0 m with a distance column, pulse exports in ρ units, oscilloscope
 * files with several channel columns, and distance exports whose velocity
 * setting is written in the many ways instruments and people write it.
 */
import { LAYOUTS as SIM_LAYOUTS, type Layout as SimLayout, writeLayout } from '../sim/layouts';
import { C0 } from './fdtd';
import type { Rng } from './rng';

export const EXTRA_LAYOUTS = [
  'pulse-metres-from-zero',
  'pulse-rho-time',
  'pulse-rho-metres',
  'scope-channels',
  'metres-velocity-note',
] as const;
export type ExtraLayout = (typeof EXTRA_LAYOUTS)[number];
export type Sim2Layout = SimLayout | ExtraLayout;
export const ALL_LAYOUTS: readonly Sim2Layout[] = [...SIM_LAYOUTS, ...EXTRA_LAYOUTS];

/** Layouts that only make sense for pulse traces. */
export const PULSE_ONLY: ReadonlySet<Sim2Layout> = new Set(['pulse-metres-from-zero', 'pulse-rho-time', 'pulse-rho-metres']);
/** Layouts whose first sample is the launch (no pre-trigger). */
export const STARTS_AT_LAUNCH: ReadonlySet<Sim2Layout> = new Set(['pulse-metres-from-zero']);

export const VELOCITY_NOTES = [
  'nvp-percent',
  'vf-space',
  'instrument-vf-colon',
  'half-velocity',
  'key-value-semicolon',
  'tab-separated',
] as const;
export type VelocityNote = (typeof VELOCITY_NOTES)[number];

export interface TraceToWrite {
  layout: Sim2Layout;
  /** Time on the instrument's axis, seconds (zero at the launch or at the first sample). */
  timeS: Float64Array;
  volts: Float64Array;
  /** Launched level (step) or launched pulse height (pulse) in volts, for ρ-unit exports. */
  incidentV: number;
  mode: 'step' | 'pulse';
  /** Velocity factor the instrument was set to; distance columns are written with it. */
  instrumentVf: number;
  cableName: string;
  z0Ohm: number;
  pulseWidthS?: number;
  velocityNote?: VelocityNote;
  /** Oscilloscope layout: channels in the file and which one holds the trace (0-based). */
  channels?: { count: number; traceIndex: number; seed: number };
}

const num = (x: number, digits = 8) => (x === 0 ? '0' : Number(x.toPrecision(digits)).toString());

function velocityLines(note: VelocityNote, vf: number, extra: { z0: number; pulseNs?: number }): string[] {
  switch (note) {
    case 'nvp-percent':
      return [`NVP ${(vf * 100).toFixed(1).replace(/\.0$/, '')}%`];
    case 'vf-space':
      return [`velocity factor ${vf.toFixed(3)}`];
    case 'instrument-vf-colon':
      return [`instrument velocity factor: ${vf.toFixed(3)}`];
    case 'half-velocity':
      // Half the propagation speed in metres per microsecond.
      return [`v/2 = ${((vf * C0) / 2 / 1e6).toFixed(1)} m/µs`];
    case 'key-value-semicolon':
      return [`vf=${vf.toFixed(3)}; z0=${extra.z0.toFixed(0)}${extra.pulseNs ? `; pulse=${num(extra.pulseNs, 4)} ns` : ''}`];
    case 'tab-separated':
      return [`Velocity factor\t${vf.toFixed(3)}`, `Impedance\t${extra.z0.toFixed(0)} ohm`];
  }
}

/** A second channel's contents: the trigger output, a quiet probe, or a neighbouring pair. */
function otherChannel(k: number, n: number, seed: number, t: Float64Array): Float64Array {
  const out = new Float64Array(n);
  let s = (seed * 7919 + k * 104729) >>> 0;
  const rnd = () => {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    return s / 4294967296 - 0.5;
  };
  for (let i = 0; i < n; i++) {
    if (k % 3 === 1) out[i] = (t[i] >= 0 && t[i] < (t[n - 1] - t[0]) * 0.05 ? 3.3 : 0) + 0.01 * rnd();
    else if (k % 3 === 2) out[i] = 0.002 * rnd();
    else out[i] = 0.05 * Math.sin(i / 37) + 0.01 * rnd();
  }
  return out;
}

export function writeTrace(o: TraceToWrite): string {
  const { timeS: t, volts: v } = o;
  const n = t.length;
  if ((SIM_LAYOUTS as readonly string[]).includes(o.layout)) {
    // ρ-unit step export of the first simulator is v/V+ − 1; a pulse in ρ units is v/V+.
    return writeLayout({
      layout: o.layout as SimLayout,
      timeS: t,
      volts: o.mode === 'pulse' && o.layout === 'time-ps-rho' ? v.map((x) => x + o.incidentV) : v,
      incidentV: o.incidentV,
      instrumentVf: o.instrumentVf,
      cableName: o.cableName,
      z0Ohm: o.z0Ohm,
    });
  }
  const rows: string[] = [];
  const k = (o.instrumentVf * C0) / 2;
  const note = o.velocityNote ?? 'vf-space';
  const pulseNs = o.pulseWidthS ? o.pulseWidthS * 1e9 : undefined;
  switch (o.layout as ExtraLayout) {
    case 'pulse-metres-from-zero': {
      rows.push(`Cable: ${o.cableName}`, ...velocityLines(note, o.instrumentVf, { z0: o.z0Ohm, pulseNs }));
      if (pulseNs) rows.push(`Pulse width: ${num(pulseNs, 4)} ns`);
      rows.push('Distance (m),Amplitude (V)');
      for (let i = 0; i < n; i++) rows.push(`${num(t[i] * k, 10)},${num(v[i], 6)}`);
      return rows.join('\n') + '\n';
    }
    case 'pulse-rho-time':
      rows.push('# reflection in units of the launched pulse', 'time (ns),rho');
      for (let i = 0; i < n; i++) rows.push(`${num(t[i] * 1e9, 10)},${num(v[i] / o.incidentV, 6)}`);
      return rows.join('\n') + '\n';
    case 'pulse-rho-metres':
      rows.push(...velocityLines(note, o.instrumentVf, { z0: o.z0Ohm, pulseNs }).map((l) => `# ${l}`));
      rows.push('Distance (m);Reflection (rho)');
      for (let i = 0; i < n; i++) rows.push(`${num(t[i] * k, 10)};${num(v[i] / o.incidentV, 6)}`);
      return rows.join('\r\n') + '\r\n';
    case 'scope-channels': {
      const ch = o.channels ?? { count: 2, traceIndex: 0, seed: 1 };
      const cols: Float64Array[] = [];
      for (let c = 0; c < ch.count; c++) cols.push(c === ch.traceIndex ? v : otherChannel(c, n, ch.seed, t));
      rows.push(['Time (s)', ...cols.map((_, c) => `CH${c + 1} (V)`)].join(','));
      for (let i = 0; i < n; i++) rows.push([num(t[i], 10), ...cols.map((col) => num(col[i], 6))].join(','));
      return rows.join('\r\n') + '\r\n';
    }
    case 'metres-velocity-note': {
      const tab = note === 'tab-separated';
      rows.push(...velocityLines(note, o.instrumentVf, { z0: o.z0Ohm, pulseNs }));
      rows.push(tab ? 'Distance (m)\tSignal (V)' : 'Distance (m),Signal (V)');
      for (let i = 0; i < n; i++) rows.push(`${num(t[i] * k, 10)}${tab ? '\t' : ','}${num(v[i], 6)}`);
      return rows.join('\n') + '\n';
    }
  }
  throw new Error(`unknown layout ${o.layout}`);
}

/** Pick a velocity note and channel layout for the layouts that carry them. */
export function decorate(layout: Sim2Layout, rng: Rng): Pick<TraceToWrite, 'velocityNote' | 'channels'> {
  const out: Pick<TraceToWrite, 'velocityNote' | 'channels'> = {};
  if (layout === 'pulse-metres-from-zero' || layout === 'pulse-rho-metres' || layout === 'metres-velocity-note')
    out.velocityNote = rng.pick(VELOCITY_NOTES);
  if (layout === 'scope-channels') {
    const count = rng.int(2, 4);
    out.channels = { count, traceIndex: rng.chance(0.7) ? 0 : rng.int(1, count - 1), seed: rng.int(1, 1e6) };
  }
  return out;
}
