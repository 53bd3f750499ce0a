import { describe, expect, it } from 'vitest';
import { adcStep, estimateNoise } from '../../../shared/trace/noise';
import { gaussianSource } from '../../../scripts/sim/line-model';

/**
 * An 8-bit recorder over ±10 V (a step of 20/256 V) whose record was exported in units of the
 * launched pulse (3.802478 V) with six significant digits, as a ρ export is: each level is
 * rounded again, so neighbouring levels differ by 0.0205400, 0.0205410, 0.0205450, 0.0205458,
 * 0.0205460 or 0.0205500 (one step, 20/256/3.802478 = 0.02054581), the smallest of them rare.
 * The analogue noise is 0.05 of a step, so most samples repeat the one before.
 */
const QV = 20 / 256;
const INC = 3.802478;
const Q = QV / INC;

function exported(seed: number): Float64Array {
  const rnd = gaussianSource(seed);
  // A launch pulse, a loss-spread echo of the other sign and a slow wander, in volts.
  const volts = (i: number) =>
    4 * Math.exp(-(((i - 1000) / 300) ** 2)) - 2 * Math.exp(-(((i - 4000) / 500) ** 2)) + 0.3 * Math.sin(i / 700);
  return new Float64Array(6000).map((_, i) => Number(((Math.round((volts(i) + 0.05 * QV * rnd()) / QV) * QV) / INC).toPrecision(6)));
}

describe('a coarse recorder exported in other units with six significant digits', () => {
  it('reads its step from the rounded levels and floors the noise at it', () => {
    for (const seed of [51, 52]) {
      const y = exported(seed);
      expect(Math.abs(adcStep(y) - Q) / Q).toBeLessThan(1e-3);
      // Rounding noise of a quantiser: q/√12 (Widrow and Kollár, "Quantization Noise", 2008, ch. 4).
      expect(Math.abs(estimateNoise(y) - Q / Math.sqrt(12)) / (Q / Math.sqrt(12))).toBeLessThan(2e-3);
    }
  });
});
