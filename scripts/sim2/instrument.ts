/**
 * The instrument: what the solver's port voltage becomes in a recorded
 * trace. Sampling on the instrument's own grid (cubic interpolation of the
 * solver's finer grid), then DC offset, linear drift, white and coloured
 * noise, and an ADC with a given number of bits that clips at full scale.
 *
 * Signal-to-noise ratio, as used throughout the sets:
 *   SNR (dB) = 20·log10(V+ / σ),
 * where V+ is the launched level at the port (the step's height, or the
 * launched pulse's height) and σ is the standard deviation of all added
 * noise (white plus coloured) before quantisation. Quantisation adds its own
 * LSB/√12 on top.
 */
import type { Rng } from './rng';

export interface Quirks {
  offsetV: number;
  /** Change over the whole record, first to last sample. */
  driftV: number;
  bits: 8 | 12 | 16;
  /** The ADC reads −fullScaleV … +fullScaleV. */
  fullScaleV: number;
  whiteSigmaV: number;
  colouredSigmaV: number;
  colour: 'none' | 'ar1' | 'pink';
  /** AR(1) coefficient for 'ar1'. */
  ar1: number;
  seed: number;
}

/** Catmull–Rom interpolation of y (spacing h, y[i] at i·h; zero before 0) at time t. */
export function interpolate(y: Float64Array, h: number, t: number): number {
  if (t <= 0) return 0;
  const x = t / h;
  const i = Math.floor(x);
  const u = x - i;
  const get = (k: number) => (k < 0 ? 0 : y[Math.min(y.length - 1, k)]);
  const p0 = get(i - 1);
  const p1 = get(i);
  const p2 = get(i + 1);
  const p3 = get(i + 2);
  return p1 + 0.5 * u * (p2 - p0 + u * (2 * p0 - 5 * p1 + 4 * p2 - p3 + u * (3 * (p1 - p2) + p3 - p0)));
}

/** Coloured noise with unit variance: AR(1) x[i] = a·x[i−1] + √(1 − a²)·e[i], or a 1/f sum of AR(1) terms. */
function colouredNoise(n: number, q: Quirks, rng: Rng): Float64Array {
  const out = new Float64Array(n);
  if (q.colour === 'ar1') {
    const a = q.ar1;
    const b = Math.sqrt(1 - a * a);
    let x = rng.normal();
    for (let i = 0; i < n; i++) {
      x = a * x + b * rng.normal();
      out[i] = x;
    }
    return out;
  }
  // Equal-power AR(1) terms with time constants spaced by 4 over the record approximate a 1/f
  // spectrum between them (a standard construction, e.g. R. F. Voss and J. Clarke, J. Acoust. Soc.
  // Am. 63 (1978) 258, who sum relaxation processes for 1/f noise).
  const terms: number[] = [];
  for (let tau = 2; tau < n; tau *= 4) terms.push(Math.exp(-1 / tau));
  const xs = terms.map(() => rng.normal());
  const norm = 1 / Math.sqrt(terms.length);
  for (let i = 0; i < n; i++) {
    let s = 0;
    for (let k = 0; k < terms.length; k++) {
      const a = terms[k];
      xs[k] = a * xs[k] + Math.sqrt(1 - a * a) * rng.normal();
      s += xs[k];
    }
    out[i] = s * norm;
  }
  return out;
}

export interface Recorded {
  volts: Float64Array;
  clipped: boolean;
  /** 1 where the sample was held at the recorder's limit. */
  atLimit: Uint8Array;
}

export function record(clean: Float64Array, q: Quirks, rng: Rng): Recorded {
  const n = clean.length;
  const col = q.colour === 'none' ? null : colouredNoise(n, q, rng);
  const lsb = (2 * q.fullScaleV) / 2 ** q.bits;
  const top = 2 ** (q.bits - 1) - 1;
  const out = new Float64Array(n);
  let clipped = false;
  const atLimit = new Uint8Array(n);
  for (let i = 0; i < n; i++) {
    let v = clean[i] + q.offsetV + (q.driftV * i) / Math.max(1, n - 1) + q.whiteSigmaV * rng.normal();
    if (col) v += q.colouredSigmaV * col[i];
    let code = Math.round(v / lsb);
    if (code > top || code < -top - 1) {
      clipped = true;
      atLimit[i] = 1;
    }
    code = Math.min(top, Math.max(-top - 1, code));
    out[i] = code * lsb;
  }
  return { volts: out, clipped, atLimit };
}
