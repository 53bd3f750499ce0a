/**
 * Noise level of the raw record.
 *
 * σ from the first differences of the samples: an edge touches few differences,
 * so their robust spread (1.4826·MAD, Hampel 1974) over √2 is the white-noise σ
 * even on a trace full of steps. Below one ADC step the noise reads as zero;
 * the uniform rounding noise of a quantiser, q/√12 (B. Widrow and I. Kollár,
 * "Quantization Noise", Cambridge 2008, ch. 4), is then the floor, but only
 * when that step really recurs: a noise-free trace's few edges are not one.
 */
import { madSigma } from './stats';

export function estimateNoise(y: Float64Array): number {
  const n = y.length;
  const diffStep = Math.max(1, Math.floor((n - 1) / 8001));
  const diffs = new Float64Array(Math.ceil((n - 1) / diffStep));
  let minStep = Infinity;
  for (let i = 1, j = 0; i < n; i += diffStep, j++) {
    const d = y[i] - y[i - 1];
    diffs[j] = d;
    const a = Math.abs(d);
    if (a > 0 && a < minStep) minStep = a;
  }
  let sigma0 = madSigma(diffs, 0, diffs.length) / Math.SQRT2;
  let atStep = 0;
  for (let j = 0; j < diffs.length; j++) if (Math.abs(Math.abs(diffs[j]) - minStep) <= 1e-9 * minStep) atStep++;
  if (Number.isFinite(minStep) && atStep >= Math.max(3, 0.002 * diffs.length)) sigma0 = Math.max(sigma0, minStep / Math.sqrt(12));
  return sigma0;
}
