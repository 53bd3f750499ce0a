import { describe, expect, it } from 'vitest';
import type { CableRlgc } from '../../../scripts/sim2/fdtd';
import { echoShape, settledShape } from '../../../scripts/sim2/loss';

const lossless50: CableRlgc = { z0Ohm: 50, vf: 0.66, rdcOhmPerM: 0, skinOhmPerMRootHz: 0, tanDelta: 0 };
const path = [{ cable: lossless50, lengthM: 20 }];
const rise = 2e-9;
const dtS = 1e-10;
const omegaMin = (2 * Math.PI) / 1e-6;
// Largest slope of an erf edge whose 10–90 % rise is r: 1/(σ√2π) with σ = r/2.5631.
const maxSlope = 2.5631 / (rise * Math.sqrt(2 * Math.PI));

describe('echo shape of a section shorter than the edge (second simulator)', () => {
  it('keeps a lone lossless pulse echo at the launched peak', () => {
    const s = echoShape(path, { mode: 'pulse', riseS: rise, widthS: 10e-9 }, 200e-9, dtS, omegaMin);
    expect(s.peakRatio).toBeCloseTo(1, 2);
  });

  it('nearly cancels a pulse echo whose closing edge follows a twentieth of a rise later', () => {
    const tau = rise / 20;
    const s = echoShape(path, { mode: 'pulse', riseS: rise, widthS: 10e-9 }, 200e-9, dtS, omegaMin, { delayS: tau, ratio: -1 });
    // The sum is τ times the pulse's slope: τ · maxSlope ≈ 0.051 of the peak.
    expect(s.peakRatio).toBeGreaterThan(0.9 * tau * maxSlope);
    expect(s.peakRatio).toBeLessThan(1.1 * tau * maxSlope);
  });

  it('leaves the first echo whole when the closing edge comes after the pulse has passed', () => {
    const s = echoShape(path, { mode: 'pulse', riseS: rise, widthS: 10e-9 }, 400e-9, dtS, omegaMin, { delayS: 50e-9, ratio: -1 });
    expect(s.peakRatio).toBeCloseTo(1, 2);
  });

  it('turns a step echo into a blip of height τ·slope and the width of the edge', () => {
    const tau = rise / 10;
    const s = echoShape(path, { mode: 'step', riseS: rise }, 200e-9, dtS, omegaMin, { delayS: tau, ratio: -1 });
    expect(s.peakRatio).toBeGreaterThan(0.9 * tau * maxSlope);
    expect(s.peakRatio).toBeLessThan(1.1 * tau * maxSlope);
    // Width at half height of the Gaussian slope: 2.3548 σ = 0.9187 of the 10–90 % rise.
    expect(s.halfWidthS / rise).toBeGreaterThan(0.85);
    expect(s.halfWidthS / rise).toBeLessThan(1.0);
    // The step itself settles back to (almost) nothing.
    expect(Math.abs(s.stepReached(100e-9))).toBeLessThan(0.01);
  });
});

describe('share of a step echo reached within a gap (second simulator)', () => {
  // A thin telecom pair: 0.27 Ω/m loop resistance and skin loss (a 0.4 mm PE pair, from memory), 4 km out.
  const thin: CableRlgc = { z0Ohm: 120, vf: 0.67, rdcOhmPerM: 0.27, skinOhmPerMRootHz: 3e-4, tanDelta: 5e-4 };
  const far = [{ cable: thin, lengthM: 4000 }];
  const rise4k = 20e-9;
  const gap = 13e-6;
  const omega4k = (2 * Math.PI) / 200e-6;

  it('is overstated by a window shorter than the response, and settles as the window grows', () => {
    const short = echoShape(far, { mode: 'step', riseS: rise4k }, 4 * gap, 2e-9, omega4k).stepReached(gap);
    const settled = settledShape(far, { mode: 'step', riseS: rise4k }, gap, 4 * gap, 2e-9, omega4k);
    const share = settled.stepReached(gap);
    // The slow diffusive tail wraps round a 52 µs window: at least twice the settled share.
    expect(short).toBeGreaterThan(2 * share);
    // Settled on the plateau: windows of 4⁴ and 4⁵ times the first agree within 2 % (wider still, the
    // transform's capped length makes its grid too coarse for the gap).
    const plateau = [4, 5].map((k) =>
      echoShape(far, { mode: 'step', riseS: rise4k }, 4 ** k * 4 * gap, 2e-9, omega4k).stepReached(gap),
    );
    expect(Math.abs(plateau[1] - plateau[0])).toBeLessThanOrEqual(0.02 * plateau[1]);
    expect(Math.abs(share - plateau[1])).toBeLessThanOrEqual(0.03 * plateau[1]);
    expect(share).toBeLessThan(0.01);
  });

  it('leaves a lossless step echo whole whatever the window', () => {
    const s = settledShape(path, { mode: 'step', riseS: rise }, 100e-9, 400e-9, dtS, omegaMin);
    expect(s.stepReached(100e-9)).toBeCloseTo(1, 2);
  });
});
