import { describe, expect, it } from 'vitest';
import { analyzeTrace } from '../../../shared/trace';
import { parsedTrace } from '../../support/parsed-trace';
import { adcStep, estimateNoise } from '../../../shared/trace/noise';
import { gaussianSource } from '../../../scripts/sim/line-model';

const DT = 1e-9;
const parsed = (y: Float64Array) => parsedTrace(y, { dtS: DT });

/** An 8-bit recorder over ±4 V: a step of 8/256 = 0.03125 V, rounding to the nearest level. */
const Q = 8 / 256;
const quantise = (v: number) => Math.round(v / Q) * Q;
/** The record: analogue noise of 0.05 of a step (so the levels flicker only near a crossing), then the recorder's rounding. */
const recorded = (level: (i: number) => number, seed: number) => {
  const rnd = gaussianSource(seed);
  return new Float64Array(N).map((_, i) => quantise(level(i) + 0.05 * Q * rnd()));
};

const LAUNCH = 400;
const N = 6000;
/** A 2 V step whose level creeps up by 1.2 steps of the recorder as the line's loss gives way (common practice: a lossy line's step response keeps rising slowly). */
const creeping = (i: number) => (i < LAUNCH ? 0 : 2 + 1.2 * Q * (1 - Math.exp(-(i - LAUNCH) / 600)));

describe('a coarse recorder', () => {
  it('reads its step from the samples and floors the noise at it', () => {
    const y = recorded(creeping, 21);
    expect(adcStep(y)).toBeCloseTo(Q, 9);
    // Rounding noise of a quantiser: q/√12 (Widrow and Kollár, "Quantization Noise", 2008, ch. 4).
    expect(estimateNoise(y)).toBeCloseTo(Q / Math.sqrt(12), 9);
  });

  it('reports no event where a slow creep crosses one level of the recorder', () => {
    // The creep crosses one level: a clean stair of 0.03125/2 = 0.016 in ρ, many times the
    // step filter's noise at its coarser scales, yet no reflection.
    const y = recorded(creeping, 22);
    const a = analyzeTrace(parsed(y), { vf: 0.66 });
    expect(a.mode).toBe('step');
    expect(a.events).toHaveLength(0);
  });

  it('still reports a real step of three levels on the same recorder', () => {
    // ρ = 3·0.03125/2 = 0.047 at 3000 samples, 2600 after the launch: d = 0.66 × 0.2998 m/ns × 2600 ns / 2 = 257.2 m.
    const y = recorded((i) => creeping(i) + (i >= 3000 ? 3 * Q : 0), 23);
    const a = analyzeTrace(parsed(y), { vf: 0.66 });
    expect(a.events).toHaveLength(1);
    expect(Math.abs(a.events[0].distanceM - 257.2)).toBeLessThan(2);
    expect(a.events[0].type).toBe('impedance-rise');
    expect(Math.abs((a.events[0].reflectionCoefficientRaw ?? NaN) - (3 * Q) / 2)).toBeLessThan(0.01);
  });
});
