/**
 * What loss does to an echo: attenuation figures of a cable, and the shape of
 * an echo after a lossy round trip, from the same pole fits the solver uses.
 * The echo shape is the inverse FFT of the excitation's spectrum times
 * exp(−2·(γ(ω) − jω/v)·ℓ) summed over the sections of the path (the pure
 * delay at the high-frequency speed taken out).
 */
import FFT from 'fft.js';
import { C0, type CableRlgc, edge, propagationOf } from './fdtd';

/** Attenuation in dB per 100 m at frequency f: 8.686 · 100 · Re γ. */
export function dbPer100m(cable: CableRlgc, fHz: number, dtS: number, omegaMin: number): number {
  return 868.6 * propagationOf(cable, dtS, omegaMin)(2 * Math.PI * fHz)[0];
}

export interface EchoShape {
  /** Pulse: peak of the lossy echo over the peak of the launched pulse. */
  peakRatio: number;
  /** Step: fraction of the echo's final height reached `afterS` past its lossless arrival. */
  stepReached: (afterS: number) => number;
  /** Time from lossless arrival to the echo's 50 % point (step) or peak (pulse). */
  delayOfMiddleS: number;
  /** Pulse: width of the lossy echo at half its peak. */
  halfWidthS: number;
}

export function echoShape(
  path: Array<{ cable: CableRlgc; lengthM: number }>,
  excitation: { mode: 'step' | 'pulse'; riseS: number; widthS?: number },
  windowS: number,
  dtS: number,
  omegaMin: number,
  /**
   * A second echo `delayS` later, `ratio` times this one's size (the closing edge of a section
   * shorter than the edge): the shape is then the sum of both, as the port sees it.
   */
  pair?: { delayS: number; ratio: number },
): EchoShape {
  let n = 1024;
  while (windowS / n > excitation.riseS / 5 && n < 1 << 17) n *= 2;
  const h = windowS / n;
  const fft = new FFT(n);
  const spec = fft.createComplexArray() as number[];
  const lead = 4 * excitation.riseS; // the lossless arrival sits here in the window
  const gammas = path.map((s) => ({ g: propagationOf(s.cable, dtS, omegaMin), s }));
  for (let k = 0; k <= n / 2; k++) {
    const w = (2 * Math.PI * k) / (n * h);
    let re = 0;
    let im = 0;
    for (const { g, s } of gammas) {
      if (k === 0) {
        re -= 2 * g(1e-3)[0] * s.lengthM;
        continue;
      }
      const [a, b] = g(w);
      re -= 2 * a * s.lengthM;
      im -= 2 * (b - w / (s.cable.vf * C0)) * s.lengthM;
    }
    // Gaussian edge derivative spectrum, delayed by `lead`.
    const sigma = excitation.riseS / 2.5631;
    const g = Math.exp(-0.5 * (w * sigma) ** 2);
    const mag = Math.exp(re) * g;
    const ph = im - w * lead;
    spec[2 * k] = mag * Math.cos(ph);
    spec[2 * k + 1] = mag * Math.sin(ph);
    if (k > 0 && k < n / 2) {
      spec[2 * (n - k)] = spec[2 * k];
      spec[2 * (n - k) + 1] = -spec[2 * k + 1];
    }
  }
  const out = fft.createComplexArray() as number[];
  fft.inverseTransform(out, spec);
  const step = new Float64Array(n);
  let acc = 0;
  for (let i = 0; i < n; i++) {
    acc += out[2 * i];
    step[i] = acc;
  }
  // Lossless reference: the same edge without the line.
  const final = step[n - 1] > 0 ? step[n - 1] : 1;
  if (pair) {
    // The closing edge's copy, linearly interpolated to its delay, added in place (back to front).
    const d = pair.delayS / h;
    for (let i = n - 1; i >= 0; i--) {
      const x = i - d;
      if (x < 0) continue;
      const k = Math.floor(x);
      const f = x - k;
      step[i] += pair.ratio * (step[k] + (k + 1 < n ? (step[k + 1] - step[k]) * f : 0));
    }
  }
  const at = (t: number) => {
    const x = Math.min(n - 1, Math.max(0, (t + lead) / h));
    const i = Math.floor(x);
    const j = Math.min(n - 1, i + 1);
    return step[i] + (step[j] - step[i]) * (x - i);
  };
  if (excitation.mode === 'pulse') {
    const wd = excitation.widthS ?? 2 * excitation.riseS;
    const shift = Math.round(wd / h);
    let peak = 0;
    let tPeak = 0;
    const pulse = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      const v = step[i] - (i >= shift ? step[i - shift] : 0);
      pulse[i] = v;
      if (v > peak) {
        peak = v;
        tPeak = i * h - lead;
      }
    }
    let above = 0;
    for (let i = 0; i < n; i++) if (pulse[i] >= peak / 2) above++;
    // Launched pulse peak: an erf edge minus its copy W later.
    const launched = edge(wd / 2, excitation.riseS) - edge(-wd / 2, excitation.riseS);
    return {
      peakRatio: peak / launched,
      stepReached: (t) => at(t) / final,
      delayOfMiddleS: tPeak - wd / 2,
      halfWidthS: above * h,
    };
  }
  if (pair) {
    // Step record: the section shows as a blip (the two edges nearly cancel); its peak and width
    // at half height stand for the echo the detector sees.
    let peak = 0;
    let tPeak = 0;
    for (let i = 0; i < n; i++) {
      if (Math.abs(step[i]) > peak) {
        peak = Math.abs(step[i]);
        tPeak = i * h - lead;
      }
    }
    let above = 0;
    for (let i = 0; i < n; i++) if (Math.abs(step[i]) >= peak / 2) above++;
    return { peakRatio: peak / final, stepReached: (t) => at(t) / final, delayOfMiddleS: tPeak, halfWidthS: above * h };
  }
  let t50 = 0;
  for (let i = 0; i < n; i++) {
    if (step[i] >= 0.5 * final) {
      t50 = i * h - lead;
      break;
    }
  }
  // Relative to the DC-attenuated height the line settles to over the window.
  return { peakRatio: 1, stepReached: (t) => at(t), delayOfMiddleS: t50, halfWidthS: 0 };
}

/**
 * A step echo's shape with the share reached `gapS` past its arrival settled: echoShape works over a
 * periodic window, and a response longer than the window (a long, thin pair's slow diffusive tail)
 * wraps round into it and overstates the share. The window grows fourfold, at most five times, until
 * the share changes by no more than 2 %.
 */
export function settledShape(
  path: Array<{ cable: CableRlgc; lengthM: number }>,
  excitation: { mode: 'step' | 'pulse'; riseS: number; widthS?: number },
  gapS: number,
  windowS: number,
  dtS: number,
  omegaMin: number,
): EchoShape {
  let shape = echoShape(path, excitation, windowS, dtS, omegaMin);
  for (let k = 0; k < 5; k++) {
    windowS *= 4;
    const wider = echoShape(path, excitation, windowS, dtS, omegaMin);
    const before = shape.stepReached(gapS);
    const after = wider.stepReached(gapS);
    shape = wider;
    if (Math.abs(after - before) <= 0.02 * Math.abs(after) + 1e-9) break;
  }
  return shape;
}
