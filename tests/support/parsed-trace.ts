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
