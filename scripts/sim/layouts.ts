/**
 * Writes a simulated trace in the CSV layouts instruments and oscilloscopes
 * produce, so the reader is exercised on every one of them.
 */
import { C0 } from './line-model';

export const LAYOUTS = [
  'time-ns-mv',
  'time-s-v-comments',
  'time-us-semicolon-decimal-comma',
  'time-ps-rho',
  'amplitude-only',
  'distance-m-preamble',
  'distance-ft-tab',
  'time-ms-units-row',
] as const;
/**
 * Further layouts used by the hand-made field cases: a distance export in ρ that starts
 * at 0 m (a pulse record in ρ is normalised to the launch peak, so its baseline is 0).
 */
export const FIELD_LAYOUTS = ['distance-m-rho'] as const;
export type Layout = (typeof LAYOUTS)[number] | (typeof FIELD_LAYOUTS)[number];

export interface WriteOptions {
  layout: Layout;
  timeS: Float64Array;
  volts: Float64Array;
  incidentV: number;
  /** VF the instrument was set to, for distance layouts. */
  instrumentVf: number;
  cableName: string;
  /** Written into the metadata of layouts that carry it. */
  z0Ohm?: number;
  /** Step or pulse record; decides how a ρ export is normalised. */
  mode?: 'step' | 'pulse';
}

const num = (x: number, digits = 10) => {
  if (x === 0) return '0';
  const s = Number(x.toPrecision(digits)).toString();
  return s;
};

export function writeLayout(o: WriteOptions): string {
  const { timeS: t, volts: v, incidentV } = o;
  const n = t.length;
  const rows: string[] = [];
  const dt = (t[n - 1] - t[0]) / (n - 1);
  switch (o.layout) {
    case 'time-ns-mv':
      rows.push('time_ns,voltage_mV');
      for (let i = 0; i < n; i++) rows.push(`${num(t[i] * 1e9)},${num(v[i] * 1e3, 7)}`);
      return rows.join('\n') + '\n';
    case 'time-s-v-comments':
      rows.push(
        '# instrument: simulated reflectometer',
        `# cable: ${o.cableName}`,
        `# velocity factor: ${o.instrumentVf}`,
        `# impedance: ${o.z0Ohm ?? 50} ohm`,
      );
      rows.push('Time (s),Amplitude (V)');
      for (let i = 0; i < n; i++) rows.push(`${num(t[i], 12)},${num(v[i], 7)}`);
      return rows.join('\r\n') + '\r\n\r\n';
    case 'time-us-semicolon-decimal-comma':
      rows.push('t [us];v [V]');
      for (let i = 0; i < n; i++) rows.push(`${num(t[i] * 1e6, 12).replace('.', ',')};${num(v[i], 7).replace('.', ',')}`);
      return '\ufeff' + rows.join('\r\n') + '\r\n';
    case 'time-ps-rho':
      rows.push('time (ps), rho');
      for (let i = 0; i < n; i++) rows.push(`${num(t[i] * 1e12, 12)}, ${num(v[i] / incidentV - 1, 7)}`);
      return rows.join('\n') + '\n';
    case 'amplitude-only':
      rows.push(`# sample interval: ${num(dt * 1e9, 12)} ns`, `# start time: ${num(t[0] * 1e9, 12)} ns`, 'amplitude (V)');
      for (let i = 0; i < n; i++) rows.push(num(v[i], 7));
      return rows.join('\n') + '\n';
    case 'distance-m-preamble': {
      rows.push(
        'Instrument,simulated reflectometer',
        `Cable,${o.cableName}`,
        `Velocity factor,${o.instrumentVf}`,
        'Distance (m),Level (V)',
      );
      const k = (o.instrumentVf * C0) / 2;
      for (let i = 0; i < n; i++) rows.push(`${num(t[i] * k, 12)},${num(v[i], 7)}`);
      return rows.join('\n') + '\n';
    }
    case 'distance-ft-tab': {
      rows.push(`# nvp: ${Math.round(o.instrumentVf * 1000) / 10}%`, 'distance_ft\tvoltage_V');
      const k = (o.instrumentVf * C0) / 2 / 0.3048;
      for (let i = 0; i < n; i++) rows.push(`${num(t[i] * k, 12)}\t${num(v[i], 7)}`);
      return rows.join('\r\n') + '\r\n\r\n\r\n';
    }
    case 'distance-m-rho': {
      rows.push(`# velocity factor ${o.instrumentVf}`, 'distance (m),rho');
      const k = (o.instrumentVf * C0) / 2;
      const offset = o.mode === 'pulse' ? 0 : 1;
      for (let i = 0; i < n; i++) rows.push(`${num(t[i] * k, 12)},${num(v[i] / incidentV - offset, 7)}`);
      return rows.join('\n') + '\n';
    }
    case 'time-ms-units-row':
      rows.push('Time;Signal', 'ms;mV');
      for (let i = 0; i < n; i++) rows.push(`${num(t[i] * 1e3, 12).replace('.', ',')};${num(v[i] * 1e3, 7).replace('.', ',')}`);
      return rows.join('\n') + '\n';
  }
}
