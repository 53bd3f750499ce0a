/**
 * Hand-made field cases: instrument set-ups the sweep does not vary (records that
 * start during the launch, ρ exports of pulse records, inverted and clipped
 * launches, mismatched sources, fixed instrument ranges that do not fit the cable),
 * and faults that are hard to see (near the instrument, weak, far down a lossy
 * pair). Each is scored like the sweep.
 */
import { COAX_50, PAIR_04, PAIR_100, POWER_MV, POWER_LV } from './cables';
import { type Layout, writeLayout } from './layouts';
import type { CableModel } from './line-model';
import { type Acquisition, type Feature, type Scenario, simulateScenario } from './scenario';
import type { SweepCase } from './sweep';

interface Setup {
  mode: 'step' | 'pulse';
  dtS: number;
  /** Record length, seconds. */
  spanS: number;
  /** Pre-trigger as a fraction of the record (0: the record starts at the launch's 50 % point). */
  pre: number;
  riseS: number;
  widthS?: number;
  /** Noise σ as a fraction of the incident level. */
  noise: number;
  bits?: number;
  /** ADC full scale as a multiple of the incident level; default 2.5. */
  fullScale?: number;
  sourceOhm?: number;
  offset?: number;
  invert?: boolean;
  layout?: Layout;
}

interface FieldCase {
  name: string;
  cable: CableModel;
  lengthM: number;
  end: Scenario['end'];
  features: Feature[];
  setup: Setup;
}

const ns = 1e-9;
const us = 1e-6;

const CASES: FieldCase[] = [
  // Pulse records with no pre-trigger, exported against distance from 0 m.
  {
    name: 'coax-pulse-from-zero',
    cable: COAX_50,
    lengthM: 120,
    end: 'open',
    features: [{ kind: 'shunt', atM: 47, rOhm: 60 }],
    setup: {
      mode: 'pulse',
      dtS: 1 * ns,
      spanS: 2 * us,
      pre: 0,
      riseS: 3 * ns,
      widthS: 10 * ns,
      noise: 0.003,
      layout: 'distance-m-preamble',
    },
  },
  {
    name: 'pair-pulse-from-zero',
    cable: PAIR_100,
    lengthM: 700,
    end: 'short',
    features: [{ kind: 'series', atM: 260, rOhm: 100 }],
    setup: {
      mode: 'pulse',
      dtS: 5 * ns,
      spanS: 10 * us,
      pre: 0,
      riseS: 15 * ns,
      widthS: 100 * ns,
      noise: 0.002,
      layout: 'distance-ft-tab',
    },
  },
  // ρ exports of pulse records, normalised to the launch peak.
  {
    name: 'coax-pulse-rho',
    cable: COAX_50,
    lengthM: 80,
    end: 'short',
    features: [{ kind: 'series', atM: 31, rOhm: 30 }],
    setup: {
      mode: 'pulse',
      dtS: 0.5 * ns,
      spanS: 1 * us,
      pre: 0.05,
      riseS: 1.5 * ns,
      widthS: 5 * ns,
      noise: 0.002,
      layout: 'distance-m-rho',
    },
  },
  {
    name: 'mv-pulse-rho-from-zero',
    cable: POWER_MV,
    lengthM: 900,
    end: 'open',
    features: [{ kind: 'shunt', atM: 350, rOhm: 20 }],
    setup: {
      mode: 'pulse',
      dtS: 10 * ns,
      spanS: 16 * us,
      pre: 0,
      riseS: 30 * ns,
      widthS: 100 * ns,
      noise: 0.002,
      layout: 'distance-m-rho',
    },
  },
  // Launch of either polarity.
  {
    name: 'lv-pulse-inverted',
    cable: POWER_LV,
    lengthM: 300,
    end: 'open',
    features: [{ kind: 'series', atM: 120, rOhm: 30 }],
    setup: { mode: 'pulse', dtS: 2 * ns, spanS: 5 * us, pre: 0.1, riseS: 8 * ns, widthS: 40 * ns, noise: 0.002, invert: true },
  },
  {
    name: 'coax-step-inverted',
    cable: COAX_50,
    lengthM: 60,
    end: 'short',
    features: [{ kind: 'series', atM: 20, rOhm: 25 }],
    setup: { mode: 'step', dtS: 0.2 * ns, spanS: 1 * us, pre: 0.1, riseS: 1 * ns, noise: 0.002, invert: true, offset: 0.05 },
  },
  // A launch that overdrives the ADC.
  {
    name: 'coax-pulse-clipped',
    cable: COAX_50,
    lengthM: 150,
    end: 'open',
    features: [{ kind: 'shunt', atM: 70, rOhm: 40 }],
    setup: { mode: 'pulse', dtS: 1 * ns, spanS: 2 * us, pre: 0.1, riseS: 3 * ns, widthS: 12 * ns, noise: 0.002, fullScale: 0.7 },
  },
  // Faults near the instrument.
  {
    name: 'coax-step-shunt-near',
    cable: COAX_50,
    lengthM: 30,
    end: 'open',
    features: [{ kind: 'shunt', atM: 0.8, rOhm: 20 }],
    setup: { mode: 'step', dtS: 0.1 * ns, spanS: 400 * ns, pre: 0.1, riseS: 0.5 * ns, noise: 0.002 },
  },
  {
    name: 'coax-step-5ohm-14m',
    cable: COAX_50,
    lengthM: 50,
    end: 'open',
    features: [{ kind: 'shunt', atM: 14, rOhm: 5 }],
    setup: { mode: 'step', dtS: 0.2 * ns, spanS: 800 * ns, pre: 0.1, riseS: 1 * ns, noise: 0.002 },
  },
  {
    name: 'coax-pulse-5ohm-14m',
    cable: COAX_50,
    lengthM: 50,
    end: 'open',
    features: [{ kind: 'shunt', atM: 14, rOhm: 5 }],
    setup: { mode: 'pulse', dtS: 0.2 * ns, spanS: 800 * ns, pre: 0.1, riseS: 1 * ns, widthS: 4 * ns, noise: 0.002 },
  },
  // Weak reflections.
  {
    name: 'coax-step-series-15ohm-noisy',
    cable: COAX_50,
    lengthM: 90,
    end: 'matched',
    features: [{ kind: 'series', atM: 37, rOhm: 15 }],
    // ρ = 15/115 = 0.13; noise σ a quarter of that step (12 dB).
    setup: { mode: 'step', dtS: 0.5 * ns, spanS: 1.5 * us, pre: 0.1, riseS: 2 * ns, noise: 0.0326 },
  },
  {
    name: 'pair-step-shunt-2k',
    cable: PAIR_100,
    lengthM: 320,
    end: 'open',
    features: [{ kind: 'shunt', atM: 180, rOhm: 2000 }],
    setup: { mode: 'step', dtS: 1 * ns, spanS: 4 * us, pre: 0.1, riseS: 3 * ns, noise: 0.0005, bits: 14 },
  },
  // Far down lossy pairs.
  {
    name: 'pair04-pulse-short-far',
    cable: PAIR_04,
    lengthM: 2000,
    end: 'open',
    features: [{ kind: 'short', atM: 1400, rOhm: 1 }],
    setup: { mode: 'pulse', dtS: 20 * ns, spanS: 40 * us, pre: 0.05, riseS: 60 * ns, widthS: 500 * ns, noise: 0.001 },
  },
  {
    name: 'pair04-pulse-open-2200',
    cable: PAIR_04,
    lengthM: 2200,
    end: 'open',
    features: [],
    setup: { mode: 'pulse', dtS: 20 * ns, spanS: 40 * us, pre: 0.05, riseS: 100 * ns, widthS: 1 * us, noise: 0.0005 },
  },
  {
    name: 'pair100-step-short-900',
    cable: PAIR_100,
    lengthM: 900,
    end: 'short',
    features: [],
    setup: { mode: 'step', dtS: 5 * ns, spanS: 20 * us, pre: 0.05, riseS: 15 * ns, noise: 0.002 },
  },
  // A strong partial fault on a low-impedance cable: ρ −0.65 is not a short.
  {
    name: 'mv-step-shunt-8ohm',
    cable: POWER_MV,
    lengthM: 1000,
    end: 'open',
    features: [{ kind: 'shunt', atM: 600, rOhm: 8 }],
    setup: { mode: 'step', dtS: 5 * ns, spanS: 15 * us, pre: 0.05, riseS: 20 * ns, noise: 0.002 },
  },
  // Mismatched source: the instrument re-reflects every echo.
  {
    name: 'coax-step-source-25ohm',
    cable: COAX_50,
    lengthM: 40,
    end: 'open',
    features: [{ kind: 'series', atM: 15, rOhm: 40 }],
    setup: { mode: 'step', dtS: 0.2 * ns, spanS: 900 * ns, pre: 0.1, riseS: 1 * ns, noise: 0.002, sourceOhm: 25 },
  },
  {
    name: 'lv-pulse-source-100ohm',
    cable: POWER_LV,
    lengthM: 200,
    end: 'open',
    features: [{ kind: 'shunt', atM: 90, rOhm: 40 }],
    setup: { mode: 'pulse', dtS: 1 * ns, spanS: 4 * us, pre: 0.1, riseS: 5 * ns, widthS: 20 * ns, noise: 0.002, sourceOhm: 100 },
  },
  // A range much longer than the cable.
  {
    name: 'coax-step-long-range',
    cable: COAX_50,
    lengthM: 25,
    end: 'open',
    features: [{ kind: 'shunt', atM: 9, rOhm: 100 }],
    setup: { mode: 'step', dtS: 1 * ns, spanS: 5 * us, pre: 0.02, riseS: 2 * ns, noise: 0.003 },
  },
];

function acquisitionOf(c: FieldCase, seed: number): Acquisition {
  const s = c.setup;
  const samples = Math.round(s.spanS / s.dtS);
  const pre = Math.round(s.pre * samples);
  return {
    mode: s.mode,
    riseTimeS: s.riseS,
    pulseWidthS: s.widthS,
    sampleIntervalS: s.dtS,
    samples,
    preTriggerSamples: pre,
    sourceV: 2,
    timeOfFirstSampleS: -pre * s.dtS,
    sourceOhm: s.sourceOhm,
    impairments: { noiseV: s.noise, adcBits: s.bits ?? 12, fullScaleV: s.fullScale ?? 2.5, seed, offsetV: s.offset },
  };
}

export function buildFieldCases(): SweepCase[] {
  return CASES.map((c, k) => {
    const scenario: Scenario = { name: c.name, cable: c.cable, lengthM: c.lengthM, end: c.end, features: c.features };
    const acq = acquisitionOf(c, 5000 + k);
    const sim = simulateScenario(scenario, acq);
    const volts = c.setup.invert ? sim.volts.map((v) => -v) : sim.volts;
    const layout = c.setup.layout ?? 'time-ns-mv';
    const csv = writeLayout({
      layout,
      timeS: sim.timeS,
      volts,
      incidentV: c.setup.invert ? -sim.incidentV : sim.incidentV,
      instrumentVf: c.cable.vf,
      cableName: c.cable.name,
      z0Ohm: c.cable.z0Ohm,
      mode: c.setup.mode,
    });
    return {
      id: `f${String(k).padStart(2, '0')}-${c.name}`,
      scenario,
      acquisition: acq,
      layout,
      csv,
      expected: sim.expected,
      vf: c.cable.vf,
      z0Ohm: c.cable.z0Ohm,
    };
  });
}
