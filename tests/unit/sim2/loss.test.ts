import { describe, expect, it } from 'vitest';
import type { CableRlgc } from '../../../scripts/sim2/fdtd';
import { echoShape } from '../../../scripts/sim2/loss';

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
