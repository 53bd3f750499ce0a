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
