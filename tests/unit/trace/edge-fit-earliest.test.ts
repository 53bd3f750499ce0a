import { describe, expect, it } from 'vitest';
import { earliestArrival, halfHeightLag } from '../../../shared/trace/edge-fit';
import { erfc } from '../../../shared/trace/loss';
import { measureOnset } from '../../../shared/trace/onset';

describe('the earliest arrival a tangent reading allows', () => {
  it('lies the modelled lag from arrival to middle, plus the launch rise, before the reading', () => {
    expect(earliestArrival(100, 12.5, 3)).toBe(84.5);
    // A lag below zero (a model that puts its middle at the arrival) widens nothing; a launch rise under
    // one sample counts as one, the sampling's own uncertainty.
    expect(earliestArrival(100, -2, 0)).toBe(99);
  });

  it('holds the true arrival of a skin-effect edge read by the tangent construction (Wigington and Nahman, Proc. IRE 45 (1957) 166)', () => {
    // v(t) = erfc(a / 2√t) after the arrival, a² = 400 samples: its middle is 1.0990·a² = 439.6 samples late.
    const arrival = 200;
    const a = 20;
    const n = 4000;
    const u = new Float64Array(n);
    for (let i = 0; i < n; i++) u[i] = i > arrival ? erfc(a / (2 * Math.sqrt(i - arrival))) : 0;
    let j = arrival;
    while (u[j] < 0.5) j++;
    const middleLag = j - 1 + (0.5 - u[j - 1]) / (u[j] - u[j - 1]) - arrival;
    expect(middleLag).toBeCloseTo(1.099 * a * a, 0);
    // The construction's low point is 10–30 % of the height (edge-fit.ts, lowFraction). At each the reading lands
    // before the arrival (onset.ts: 0.04·a² at 10 %; worked out here, 0.044·a², 0.225·a² and 0.485·a²), and so
    // before the middle: the arrival lies after the bound, whatever the low point.
    for (const [fLo, leadBy] of [
      [0.1, 0.044],
      [0.2, 0.225],
      [0.3, 0.485],
    ]) {
      const reading = measureOnset(u, j, () => 0, 1, fLo, 0, n - 1).onset;
      expect((arrival - reading) / (a * a)).toBeCloseTo(leadBy, 2);
      expect(reading).toBeLessThan(arrival + middleLag);
      const earliest = earliestArrival(reading, middleLag, 1);
      expect(earliest).toBeLessThan(arrival);
      expect(earliest).toBeCloseTo(reading - middleLag - 1, 9);
    }
  });

  it('bounds a pulse echo by the half area of its integral, which a skin-spread echo puts far past its peak', () => {
    // The skin effect's echo of an impulse is the derivative of erfc(a / 2√t): it peaks at a²/6 and holds half
    // its area at 1.0990·a² (Wigington and Nahman). Here a² = 400, as exact increments of the step over
    // 200 000 samples, whose running sum then reaches erfc(a / 2√200000) = 0.9748 of the whole.
    const a = 20;
    const n = 200000;
    const step = (t: number) => (t > 0 ? erfc(a / (2 * Math.sqrt(t))) : 0);
    const echo = new Float64Array(n);
    for (let i = 1; i < n; i++) echo[i] = step(i) - step(i - 1);
    let peak = 0;
    for (let i = 1; i < n; i++) if (echo[i] > echo[peak]) peak = i;
    expect(Math.abs(peak - (a * a) / 6)).toBeLessThanOrEqual(1);
    // Half of what the sum reaches: erfc(x) = 0.9748/2 by bisection, t = (a / 2x)².
    const half = step(n - 1) / 2;
    let lo = 0;
    let hi = 2;
    for (let it = 0; it < 60; it++) {
      const mid = (lo + hi) / 2;
      if (erfc(mid) > half) lo = mid;
      else hi = mid;
    }
    const expected = (a / (2 * lo)) ** 2;
    expect(expected).toBeCloseTo(414.7, 1);
    expect(Math.abs(halfHeightLag(echo, true) - expected)).toBeLessThan(1);
    expect(halfHeightLag(echo, true)).toBeGreaterThan(6 * peak);
    // A step's own values need no integrating: the same half height, read straight off them.
    const stepValues = new Float64Array(n);
    for (let i = 0; i < n; i++) stepValues[i] = step(i);
    expect(Math.abs(halfHeightLag(stepValues, false) - expected)).toBeLessThan(1);
  });
});
