/**
 * Frequency-domain transmission-line simulator for TDR traces.
 *
 * A cable is a cascade of uniform line sections (RLGC per metre with DC
 * resistance, skin-effect resistance and internal inductance, and dielectric
 * loss) and lumped series or shunt elements, ending in an open, a short or a
 * resistor. Input impedance is found with ABCD (chain) matrices
 * (D. M. Pozar, "Microwave Engineering", 4th ed., §4.4), the port voltage of a
 * source with internal resistance Rs is Vs·Zin/(Rs+Zin), and the time trace
 * comes from an inverse FFT of that response times a Gaussian edge spectrum.
 * Skin effect is modelled as Z_int = Rs·√f·(1+j), the surface impedance of a
 * good conductor (Pozar §1.7; S. Ramo, J. Whinnery, T. Van Duzer, "Fields and
 * Waves in Communication Electronics", §5.6), which keeps the response causal.
 */
import FFT from 'fft.js';

export const C0 = 299_792_458;

export interface CableModel {
  name: string;
  /** High-frequency characteristic impedance. */
  z0Ohm: number;
  /** High-frequency velocity factor. */
  vf: number;
  /** DC loop resistance (both conductors) per metre. */
  rdcOhmPerM: number;
  /** Skin-effect loop resistance per metre at 1 Hz; R_ac = k·√f. */
  skinOhmPerMRootHz: number;
  /** Dielectric loss tangent. */
  tanDelta: number;
}

export type Element =
  | { kind: 'line'; lengthM: number; cable: CableModel }
  | { kind: 'series'; rOhm?: number; lH?: number }
  | { kind: 'shunt'; rOhm?: number; cF?: number };

/** 'matched' ends in the last section's own characteristic impedance at every frequency: no reflection at all. */
export type Termination = { kind: 'open' } | { kind: 'short' } | { kind: 'load'; rOhm: number } | { kind: 'matched' };

export interface Network {
  elements: Element[];
  termination: Termination;
}

type C = [number, number];
const mul = (a: C, b: C): C => [a[0] * b[0] - a[1] * b[1], a[0] * b[1] + a[1] * b[0]];
const add = (a: C, b: C): C => [a[0] + b[0], a[1] + b[1]];
const sub = (a: C, b: C): C => [a[0] - b[0], a[1] - b[1]];
const div = (a: C, b: C): C => {
  const d = b[0] * b[0] + b[1] * b[1];
  return [(a[0] * b[0] + a[1] * b[1]) / d, (a[1] * b[0] - a[0] * b[1]) / d];
};
const csqrt = (a: C): C => {
  const r = Math.hypot(a[0], a[1]);
  const re = Math.sqrt((r + a[0]) / 2);
  const im = Math.sign(a[1] || 1) * Math.sqrt(Math.max(0, (r - a[0]) / 2));
  return [re, im];
};
const cexp = (a: C): C => {
  const m = Math.exp(a[0]);
  return [m * Math.cos(a[1]), m * Math.sin(a[1])];
};

/** Propagation constant and characteristic impedance of a cable at frequency f. */
export function lineParameters(cable: CableModel, f: number): { gamma: C; zc: C } {
  const w = 2 * Math.PI * f;
  const v = cable.vf * C0;
  const L = cable.z0Ohm / v;
  const Cap = 1 / (cable.z0Ohm * v);
  const rs = cable.skinOhmPerMRootHz * Math.sqrt(f);
  const z: C = [cable.rdcOhmPerM + rs, w * L + rs];
  const y: C = [w * Cap * cable.tanDelta, w * Cap];
  return { gamma: csqrt(mul(z, y)), zc: csqrt(div(z, y)) };
}

/** Input impedance as a ratio num/den, so that an open (den = 0) needs no infinity. */
function inputImpedance(net: Network, f: number): { num: C; den: C } {
  const w = 2 * Math.PI * f;
  let num: C;
  let den: C;
  switch (net.termination.kind) {
    case 'open':
      num = [1, 0];
      den = [0, 0];
      break;
    case 'short':
      num = [0, 0];
      den = [1, 0];
      break;
    case 'matched': {
      const last = [...net.elements].reverse().find((e) => e.kind === 'line');
      num = last && last.kind === 'line' ? lineParameters(last.cable, f).zc : [50, 0];
      den = [1, 0];
      break;
    }
    default:
      num = [net.termination.rOhm, 0];
      den = [1, 0];
  }
  for (let k = net.elements.length - 1; k >= 0; k--) {
    const el = net.elements[k];
    if (el.kind === 'line') {
      const { gamma, zc } = lineParameters(el.cable, f);
      // cosh and sinh scaled by e^(−γl) so long lossy sections do not overflow.
      const e2 = cexp([-2 * gamma[0] * el.lengthM, -2 * gamma[1] * el.lengthM]);
      const ch: C = [(1 + e2[0]) / 2, e2[1] / 2];
      const sh: C = [(1 - e2[0]) / 2, -e2[1] / 2];
      const a = ch;
      const b = mul(zc, sh);
      const c = div(sh, zc);
      const nNum = add(mul(a, num), mul(b, den));
      const nDen = add(mul(c, num), mul(ch, den));
      num = nNum;
      den = nDen;
    } else if (el.kind === 'series') {
      const zs: C = [el.rOhm ?? 0, w * (el.lH ?? 0)];
      num = add(num, mul(zs, den));
    } else {
      const g = el.rOhm !== undefined ? 1 / el.rOhm : 0;
      const yp: C = [g, w * (el.cF ?? 0)];
      den = add(mul(yp, num), den);
    }
    const s = Math.max(Math.hypot(num[0], num[1]), Math.hypot(den[0], den[1]));
    if (s > 0) {
      num = [num[0] / s, num[1] / s];
      den = [den[0] / s, den[1] / s];
    }
  }
  return { num, den };
}

export interface SimulationSettings {
  /** Samples in the output record. */
  samples: number;
  sampleIntervalS: number;
  /** Time of the launch (50 % of the source edge), measured from the first sample. */
  launchAtS: number;
  /** 10–90 % rise time of the source edge (erf-shaped). */
  riseTimeS: number;
  /** Source open-circuit voltage step. The port sees half of it on a matched line. */
  sourceV: number;
  sourceOhm: number;
  /** 'step', or 'pulse' with a width (between the 50 % points of its edges). */
  excitation: { kind: 'step' } | { kind: 'pulse'; widthS: number };
  /** 'port' is the voltage at the instrument; 'reflection' is the reflected wave only, referred to the reference impedance. */
  output?: 'port' | 'reflection';
}

/** Noise-free port voltage (or reflected wave) of a network driven by a Gaussian-edged step or pulse. */
export function simulate(net: Network, s: SimulationSettings): Float64Array {
  const dt = s.sampleIntervalS;
  let nfft = 1;
  while (nfft < s.samples * 4) nfft *= 2;
  const T = nfft * dt;
  const fft = new FFT(nfft);
  const spec = fft.createComplexArray() as number[];
  const sigma = s.riseTimeS / 2.5631; // 10–90 % of an erf edge is 2.5631 σ
  const zref = s.sourceOhm;
  for (let k = 0; k <= nfft / 2; k++) {
    const f = k === 0 ? 1e-3 / T : k / T;
    const { num, den } = inputImpedance(net, f);
    let h: C;
    if (s.output === 'reflection') {
      // Γ = (Zin − Zref)/(Zin + Zref); the incident wave is Vs/2.
      h = div(sub(num, mul([zref, 0], den)), add(num, mul([zref, 0], den)));
      h = [h[0] * 0.5 * s.sourceV, h[1] * 0.5 * s.sourceV];
    } else {
      h = div(num, add(num, mul([s.sourceOhm, 0], den)));
      h = [h[0] * s.sourceV, h[1] * s.sourceV];
    }
    const g = Math.exp(-2 * Math.PI * Math.PI * sigma * sigma * f * f);
    const ph = -2 * Math.PI * f * s.launchAtS;
    let x = mul(h, [g * Math.cos(ph), g * Math.sin(ph)]);
    if (s.excitation.kind === 'pulse') {
      // Rectangular pulse = step(t) − step(t − W).
      const pw = -2 * Math.PI * f * s.excitation.widthS;
      x = mul(x, [1 - Math.cos(pw), -Math.sin(pw)]);
    }
    spec[2 * k] = x[0];
    spec[2 * k + 1] = x[1];
    if (k > 0 && k < nfft / 2) {
      spec[2 * (nfft - k)] = x[0];
      spec[2 * (nfft - k) + 1] = -x[1];
    }
  }
  const out = fft.createComplexArray() as number[];
  fft.inverseTransform(out, spec);
  // The spectrum is that of the derivative's samples (unit-area edge), so a running sum gives the step response.
  const y = new Float64Array(s.samples);
  let acc = 0;
  for (let i = 0; i < s.samples; i++) {
    // Trapezoidal running sum, so a sample at the 50 % time reads half the step.
    y[i] = acc + out[2 * i] / 2;
    acc += out[2 * i];
  }
  return y;
}

/** Reflection coefficient of a load on a line, ρ = (ZL − Z0)/(ZL + Z0). */
export function reflectionOf(zl: number, z0: number): number {
  return (zl - z0) / (zl + z0);
}

export interface Impairments {
  /** Standard deviation of white noise, volts. */
  noiseV: number;
  /** ADC resolution over ±fullScaleV. */
  adcBits: number;
  fullScaleV: number;
  /** Constant offset added before the ADC. */
  offsetV?: number;
  /** Linear drift over the record, volts from first to last sample. */
  driftV?: number;
  seed: number;
}

/** Deterministic normal deviates (mulberry32 + Box–Muller) so every run gives the same traces. */
export function gaussianSource(seed: number): () => number {
  let a = seed >>> 0;
  const uniform = () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
  return () => {
    const u = Math.max(uniform(), 1e-12);
    const v = uniform();
    return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * v);
  };
}

/** Noise, offset, drift, then quantisation and clipping as an ADC would. */
export function impair(y: Float64Array, imp: Impairments): Float64Array {
  const rnd = gaussianSource(imp.seed);
  const lsb = (2 * imp.fullScaleV) / 2 ** imp.adcBits;
  const out = new Float64Array(y.length);
  const n = y.length;
  for (let i = 0; i < n; i++) {
    let v = y[i] + imp.noiseV * rnd() + (imp.offsetV ?? 0) + ((imp.driftV ?? 0) * i) / (n - 1);
    v = Math.round(v / lsb) * lsb;
    out[i] = Math.min(imp.fullScaleV, Math.max(-imp.fullScaleV, v));
  }
  return out;
}
