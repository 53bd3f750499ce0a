/**
 * A scenario is a cable route with features at known distances. It builds the
 * simulator network and lists the events an ideal engine should report, at
 * their apparent distance (using the cable's nominal VF).
 */
import {
  type CableModel,
  type Element,
  type Impairments,
  type Network,
  type Termination,
  simulate,
  impair,
  C0,
} from './line-model';
import { variant } from './cables';

export type Feature =
  | { kind: 'open'; atM: number }
  | { kind: 'short'; atM: number; rOhm?: number }
  | { kind: 'shunt'; atM: number; rOhm: number }
  | { kind: 'series'; atM: number; rOhm: number }
  | { kind: 'wet'; atM: number; lengthM: number; zScale: number; vfScale: number }
  | { kind: 'splice'; atM: number; lengthM: number; zScale: number };

export interface Scenario {
  name: string;
  cable: CableModel;
  lengthM: number;
  /** Far end: open, short, or a matched load. */
  end: 'open' | 'short' | 'matched';
  features: Feature[];
}

export interface ExpectedEvent {
  distanceM: number;
  /** Too weak to be seen behind earlier faults: a report is allowed but not required. */
  optional?: boolean;
  type: 'open' | 'short' | 'impedance-rise' | 'impedance-drop';
  what: string;
  /** The feature's own reflection coefficient, as a matched, lossless line in front of it would show it. */
  rho: number;
  /**
   * A short section (a splice) shows its ρ only if it is longer than the edge: its reading
   * is then at most |rho|, so only its sign and that bound are checked.
   */
  rhoIsBound?: boolean;
  /** Round-trip transmission past lumped faults and impedance steps before it (lossless). */
  transmission?: number;
  /** Lumped (a resistor) or distributed (a change of line impedance). */
  lumped?: boolean;
}

function reflection(zl: number, z0: number): number {
  return (zl - z0) / (zl + z0);
}

export function buildNetwork(sc: Scenario): { net: Network; expected: ExpectedEvent[] } {
  const elements: Element[] = [];
  const expected: ExpectedEvent[] = [];
  const feats = [...sc.features].sort((a, b) => a.atM - b.atM);
  let pos = 0;
  let extra = 0; // apparent extra length from slower sections
  let termination: Termination =
    sc.end === 'open' ? { kind: 'open' } : sc.end === 'short' ? { kind: 'short' } : { kind: 'matched' };
  let ended = false;
  const z0 = sc.cable.z0Ohm;
  for (const f of feats) {
    if (f.atM > pos) elements.push({ kind: 'line', lengthM: f.atM - pos, cable: sc.cable });
    pos = f.atM;
    const apparent = f.atM + extra;
    switch (f.kind) {
      case 'open':
        termination = { kind: 'open' };
        expected.push({ distanceM: apparent, type: 'open', what: 'open', rho: 1, lumped: true });
        ended = true;
        break;
      case 'short': {
        const r = f.rOhm ?? 0.1;
        elements.push({ kind: 'shunt', rOhm: r });
        const rho = reflection((r * z0) / (r + z0), z0);
        expected.push({
          distanceM: apparent,
          type: rho <= -0.8 ? 'short' : 'impedance-drop',
          what: `short ${r} Ω`,
          rho,
          lumped: true,
        });
        break;
      }
      case 'shunt': {
        elements.push({ kind: 'shunt', rOhm: f.rOhm });
        const rho = reflection((f.rOhm * z0) / (f.rOhm + z0), z0);
        expected.push({
          distanceM: apparent,
          type: rho <= -0.8 ? 'short' : 'impedance-drop',
          what: `shunt ${f.rOhm} Ω`,
          rho,
          lumped: true,
        });
        break;
      }
      case 'series': {
        elements.push({ kind: 'series', rOhm: f.rOhm });
        const rho = reflection(z0 + f.rOhm, z0);
        expected.push({
          distanceM: apparent,
          type: rho >= 0.8 ? 'open' : 'impedance-rise',
          what: `series ${f.rOhm} Ω`,
          rho,
          lumped: true,
        });
        break;
      }
      case 'wet': {
        const wet = variant(sc.cable, f.zScale, f.vfScale, 'wet');
        elements.push({ kind: 'line', lengthM: f.lengthM, cable: wet });
        const rho = reflection(f.zScale, 1);
        expected.push({
          distanceM: apparent,
          type: f.zScale < 1 ? 'impedance-drop' : 'impedance-rise',
          what: 'wet section start',
          rho,
        });
        extra += f.lengthM / f.vfScale - f.lengthM;
        expected.push({
          distanceM: f.atM + extra + f.lengthM,
          type: f.zScale < 1 ? 'impedance-rise' : 'impedance-drop',
          what: 'wet section end',
          rho: -rho,
        });
        pos = f.atM + f.lengthM;
        break;
      }
      case 'splice': {
        const sp = variant(sc.cable, f.zScale, 1, 'splice');
        elements.push({ kind: 'line', lengthM: f.lengthM, cable: sp });
        expected.push({
          distanceM: apparent,
          type: f.zScale < 1 ? 'impedance-drop' : 'impedance-rise',
          what: 'splice',
          rho: reflection(f.zScale, 1),
          rhoIsBound: true,
        });
        pos = f.atM + f.lengthM;
        break;
      }
    }
    if (ended) break;
  }
  if (!ended) {
    if (sc.lengthM > pos) elements.push({ kind: 'line', lengthM: sc.lengthM - pos, cable: sc.cable });
    if (sc.end !== 'matched')
      expected.push({
        distanceM: sc.lengthM + extra,
        type: sc.end,
        what: `cable end (${sc.end})`,
        rho: sc.end === 'open' ? 1 : -1,
        lumped: true,
      });
  }
  // Round-trip transmission decides what is still visible. A lumped resistor passes (1 − |ρ|)
  // each way (series: 2Z0/(2Z0 + R); shunt: 2R/(2R + Z0)); a change of line impedance passes
  // 1 + ρ one way and 1 − ρ back, 1 − ρ² in all (D. M. Pozar, "Microwave Engineering", 4th ed., §2.3).
  // An event is required while the lumped faults before it pass at least a quarter of the wave.
  let transmission = 1;
  let pastLumped = 1;
  for (const e of expected) {
    e.transmission = transmission;
    if (pastLumped < 0.25) e.optional = true;
    const r = Math.min(0.999, Math.abs(e.rho));
    transmission *= e.lumped ? (1 - r) ** 2 : 1 - r * r;
    if (e.lumped) pastLumped *= (1 - r) ** 2;
  }
  return { net: { elements, termination }, expected };
}

export interface Acquisition {
  mode: 'step' | 'pulse';
  /** 10–90 % rise of the source edge. */
  riseTimeS: number;
  pulseWidthS?: number;
  sampleIntervalS: number;
  samples: number;
  /** Samples recorded before the launch. */
  preTriggerSamples: number;
  sourceV: number;
  /** The instrument's trigger time on its own axis: time of sample 0. */
  timeOfFirstSampleS: number;
  output?: 'port' | 'reflection';
  /** Source resistance; default the cable's own impedance (a matched instrument). */
  sourceOhm?: number;
  impairments: Omit<Impairments, 'seed'> & { seed: number };
}

/** A reasonable instrument set-up for a route: record 1.35× the round trip, edge ~1/400 of it. */
export function defaultAcquisition(
  sc: Scenario,
  mode: 'step' | 'pulse',
  seed: number,
  noiseFrac = 0.003,
  bits = 12,
): Acquisition {
  const rt = (2 * sc.lengthM) / (sc.cable.vf * C0);
  const dt = niceInterval(rt / 1500);
  const rise = Math.max(4 * dt, rt / 400);
  const pre = 100;
  const samples = pre + Math.ceil((1.35 * rt) / dt);
  const vinc = 1;
  return {
    mode,
    riseTimeS: rise,
    pulseWidthS: mode === 'pulse' ? Math.round((2 * rise) / dt) * dt : undefined,
    sampleIntervalS: dt,
    samples,
    preTriggerSamples: pre,
    sourceV: 2 * vinc,
    timeOfFirstSampleS: -pre * dt,
    impairments: { noiseV: noiseFrac * vinc, adcBits: bits, fullScaleV: 2.5 * vinc, seed },
  };
}

/** Round a sample interval to 1, 2 or 5 × 10^k seconds, as instruments offer. */
export function niceInterval(x: number): number {
  const e = Math.floor(Math.log10(x));
  const m = x / 10 ** e;
  const nice = m < 1.5 ? 1 : m < 3.5 ? 2 : m < 7.5 ? 5 : 10;
  return nice * 10 ** e;
}

export interface SimulatedTrace {
  timeS: Float64Array;
  volts: Float64Array;
  incidentV: number;
  expected: ExpectedEvent[];
}

export function simulateScenario(sc: Scenario, acq: Acquisition): SimulatedTrace {
  const { net, expected } = buildNetwork(sc);
  const launchAt = acq.preTriggerSamples * acq.sampleIntervalS;
  const clean = simulate(net, {
    samples: acq.samples,
    sampleIntervalS: acq.sampleIntervalS,
    launchAtS: launchAt,
    riseTimeS: acq.riseTimeS,
    sourceV: acq.sourceV,
    sourceOhm: acq.sourceOhm ?? sc.cable.z0Ohm,
    excitation: acq.mode === 'pulse' ? { kind: 'pulse', widthS: acq.pulseWidthS ?? 2 * acq.riseTimeS } : { kind: 'step' },
    output: acq.output,
  });
  const volts = impair(clean, acq.impairments);
  const timeS = new Float64Array(acq.samples);
  for (let i = 0; i < acq.samples; i++) timeS[i] = acq.timeOfFirstSampleS + i * acq.sampleIntervalS;
  const rs = acq.sourceOhm ?? sc.cable.z0Ohm;
  return { timeS, volts, incidentV: (acq.sourceV * sc.cable.z0Ohm) / (rs + sc.cable.z0Ohm), expected };
}
