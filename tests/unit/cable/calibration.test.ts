import { describe, expect, it } from 'vitest';
import { calibrationStats, vfFromKnownLength, vfFromKnownLengthNs } from '../../../shared/cable/calibration';
import { distanceFromRoundTrip } from '../../../shared/cable/propagation';

describe('VF from a known length', () => {
  it('gives VF = 2L/(c·t)', () => {
    // 100 m of PE coax (VF 0.66) → round trip 2·100/(0.66·c) = 1010.8 ns; "about 10 ns per metre there and
    // back in PE coax" is common practice.
    expect(vfFromKnownLengthNs(100, 1010.8)).toBeCloseTo(0.66, 4);
    // Light in vacuum covers 299 792 458 m in 1 s (SI definition of the metre): 1 s round trip → VF 1 over c/2.
    expect(vfFromKnownLength(299_792_458 / 2, 1)).toBe(1);
  });

  it('is the inverse of the trace engine’s distance from round-trip time', () => {
    for (const vf of [0.5, 0.66, 0.87]) {
      const d = distanceFromRoundTrip(2.5e-6, vf);
      expect(vfFromKnownLength(d, 2.5e-6)).toBeCloseTo(vf, 12);
    }
  });
});

describe('calibration statistics', () => {
  it('gives the mean, sample standard deviation, count and range', () => {
    // Arithmetic: mean of 0.64, 0.66, 0.68 is 0.66; Σ(x − x̄)² = 0.0008, /(n − 1) = 0.0004, √ = 0.02.
    const s = calibrationStats([0.64, 0.66, 0.68]);
    expect(s.count).toBe(3);
    expect(s.mean).toBeCloseTo(0.66, 12);
    expect(s.stdDev).toBeCloseTo(0.02, 12);
    expect([s.min, s.max]).toEqual([0.64, 0.68]);
  });

  it('has no spread for one value and nothing for none', () => {
    expect(calibrationStats([0.7])).toEqual({ count: 1, mean: 0.7, stdDev: null, min: 0.7, max: 0.7 });
    expect(calibrationStats([])).toEqual({ count: 0, mean: null, stdDev: null, min: null, max: null });
  });

  it('takes any number of values (a cable type with hundreds of thousands of calibrations)', () => {
    // 300,000 values alternating 0.64 and 0.68: mean 0.66, range 0.64–0.68 (arithmetic).
    const s = calibrationStats(Array.from({ length: 300_000 }, (_, i) => (i % 2 ? 0.68 : 0.64)));
    expect(s.count).toBe(300_000);
    expect(s.mean).toBeCloseTo(0.66, 9);
    expect([s.min, s.max]).toEqual([0.64, 0.68]);
  });
});
