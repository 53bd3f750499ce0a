import type { ParsedTrace } from '../../shared/trace';

/**
 * A record as the CSV reader would hand it to the engine: amplitudes in volts
 * (or reflection coefficient), evenly sampled from t0, with no metadata or hints.
 */
export function parsedTrace(
  amplitude: Float64Array,
  opts: { dtS?: number; t0S?: number; timeS?: Float64Array; unit?: 'V' | 'rho' } = {},
): ParsedTrace {
  const dt = opts.dtS ?? 1e-9;
  const t0 = opts.t0S ?? 0;
  const timeS = opts.timeS ?? new Float64Array(amplitude.length).map((_, i) => t0 + i * dt);
  return {
    timeS,
    amplitude,
    amplitudeUnit: opts.unit ?? 'V',
    metadata: {},
    hints: {},
    layout: {} as ParsedTrace['layout'],
    warnings: [],
  };
}

/** erf by Abramowitz and Stegun, "Handbook of Mathematical Functions" (1964), eq. 7.1.26 (|error| < 1.5e-7). */
export function erf(x: number): number {
  const t = 1 / (1 + 0.3275911 * Math.abs(x));
  const y = 1 - ((((1.061405429 * t - 1.453152027) * t + 1.421413741) * t - 0.284496736) * t + 0.254829592) * t * Math.exp(-x * x);
  return x >= 0 ? y : -y;
}

/**
 * Gaussian-edged steps and pulses whose 10–90 % rise takes `riseSamples`
 * (σ = rise / 2.5631): `edge(i)` rises through one half at i = 0, and
 * `pulse(i, a, w)` starts at sample a and is w samples wide at half height.
 */
export function gaussianShapes(riseSamples: number) {
  const sigma = riseSamples / 2.5631;
  const edge = (i: number) => 0.5 * (1 + erf(i / (sigma * Math.SQRT2)));
  const pulse = (i: number, a: number, w: number) => edge(i - a) - edge(i - a - w);
  return { edge, pulse };
}

/**
 * A step record of erf edges (each `height` high, centred on sample `at`, a 10–90 % rise of about
 * 2.6 samples) plus uniform noise of ± 0.002 from a linear congruential generator started at `seed`,
 * so every run of a test sees the same samples.
 */
export function erfStepTrace(n: number, parts: Array<{ at: number; height: number }>, seed: number): Float64Array {
  let s = seed >>> 0;
  const noise = () => {
    s = (Math.imul(s, 1103515245) + 12345) >>> 0;
    return (s / 2 ** 32 - 0.5) * 0.004;
  };
  const y = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let v = 0;
    for (const p of parts) v += (p.height * (1 + erf((i - p.at) / 2))) / 2;
    y[i] = v + noise();
  }
  return y;
}
