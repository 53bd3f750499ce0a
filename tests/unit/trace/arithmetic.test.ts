import { describe, expect, it } from 'vitest';
import {
  distanceFromRoundTrip,
  M_PER_FT,
  roundTripFromDistance,
  SPEED_OF_LIGHT_M_PER_S,
} from '../../../shared/cable/propagation';
import { impedanceFromReflection, reflectionFromImpedance } from '../../../shared/trace';

describe('propagation', () => {
  it('uses the defined speed of light and foot', () => {
    expect(SPEED_OF_LIGHT_M_PER_S).toBe(299_792_458); // exact, SI definition of the metre (BIPM)
    expect(M_PER_FT).toBe(0.3048); // exact, 1959 international yard and pound agreement
  });

  it('turns a round trip into distance as VF·c·t/2', () => {
    // VF 0.70 and a 50 ns round trip give 5.25 m to the centimetre (worked example: 0.70 · c · 50 ns / 2, c exact by SI).
    expect(Math.round(distanceFromRoundTrip(50e-9, 0.7) * 100) / 100).toBe(5.25);
    // 1 µs round trip in vacuum is 149.896 m one way (c/2 · 1 µs; common practice).
    expect(distanceFromRoundTrip(1e-6, 1)).toBeCloseTo(149.896229, 6);
    // Solid-PE coax, VF 0.66 (handbook value, from memory): 100 m is a 1.0108 µs round trip.
    expect(roundTripFromDistance(100, 0.66)).toBeCloseTo(1.0108e-6, 10);
  });

  it('round-trips distance and time', () => {
    for (const d of [0.3, 5, 123.4, 3000]) expect(distanceFromRoundTrip(roundTripFromDistance(d, 0.58), 0.58)).toBeCloseTo(d, 9);
  });
});

describe('reflection coefficient', () => {
  it('follows ρ = (ZL − Z0)/(ZL + Z0)', () => {
    // Pozar, Microwave Engineering, eq. 2.35: open → +1, short → −1, matched → 0.
    expect(reflectionFromImpedance(Infinity, 50)).toBe(1);
    expect(reflectionFromImpedance(0, 50)).toBe(-1);
    expect(reflectionFromImpedance(50, 50)).toBe(0);
    // 75 Ω load on a 50 Ω line: ρ = 25/125 = +0.2 (textbook example).
    expect(reflectionFromImpedance(75, 50)).toBeCloseTo(0.2, 12);
    // 25 Ω on 50 Ω: ρ = −1/3.
    expect(reflectionFromImpedance(25, 50)).toBeCloseTo(-1 / 3, 12);
  });

  it('inverts to Z = Z0 (1 + ρ)/(1 − ρ)', () => {
    expect(impedanceFromReflection(0.2, 50)).toBeCloseTo(75, 10);
    expect(impedanceFromReflection(-1 / 3, 50)).toBeCloseTo(25, 10);
    expect(impedanceFromReflection(1, 50)).toBe(Infinity);
    expect(impedanceFromReflection(-1, 50)).toBe(0);
  });
});
