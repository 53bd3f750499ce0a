import { describe, expect, it } from 'vitest';
import { interpolate, matchEvents } from '../../../shared/field/compare';
import { decimateMinMax } from '../../../shared/trace';

describe('decimation for the trace viewer', () => {
  it('keeps a one-sample spike in a 100 000-sample trace drawn with 500 buckets', () => {
    const n = 100_000;
    const x = Float64Array.from({ length: n }, (_, i) => i);
    const y = new Float64Array(n).fill(0.25);
    y[61_237] = 0.9; // one narrow echo
    y[80_001] = -0.4; // and one dip
    const points = decimateMinMax(x, y, 500);
    expect(points.length).toBeLessThanOrEqual(1000);
    expect(points).toContainEqual({ x: 61_237, y: 0.9 });
    expect(points).toContainEqual({ x: 80_001, y: -0.4 });
    // In time order, so the line is drawn left to right.
    expect(points.every((p, i) => i === 0 || p.x > points[i - 1].x)).toBe(true);
  });
});

describe('baseline comparison', () => {
  it('interpolates linearly between samples (hand-worked)', () => {
    // Halfway between (10, 1) and (20, 3) is 2; a quarter of the way is 1.5.
    expect(interpolate([0, 10, 20], [0, 1, 3], 15)).toBe(2);
    expect(interpolate([0, 10, 20], [0, 1, 3], 12.5)).toBe(1.5);
    expect(interpolate([0, 10, 20], [0, 1, 3], 99)).toBe(3);
  });

  it('calls an event new only when no reference event of the same sign is within the joint uncertainty', () => {
    const ref = [
      { index: 0, distanceM: 120, uncertaintyM: 2, reflectionCoefficient: -0.1, type: 'impedance-drop' },
      { index: 1, distanceM: 400, uncertaintyM: 6, reflectionCoefficient: 0.95, type: 'open' },
    ];
    const now = [
      { index: 0, distanceM: 121.5, uncertaintyM: 2, reflectionCoefficient: -0.12, type: 'impedance-drop' },
      { index: 1, distanceM: 250, uncertaintyM: 4, reflectionCoefficient: 0.3, type: 'impedance-rise' },
      { index: 2, distanceM: 402, uncertaintyM: 6, reflectionCoefficient: 0.93, type: 'open' },
    ];
    const m = matchEvents(now, ref);
    expect(m.newEvents.map((e) => e.index)).toEqual([1]);
    expect(m.missing).toEqual([]);
    // A sign change at the same place is a different event (an open became a short).
    const flipped = matchEvents([{ ...now[2], reflectionCoefficient: -0.9, type: 'short' }], ref);
    expect(flipped.newEvents).toHaveLength(1);
    expect(flipped.missing.map((e) => e.index)).toEqual([0, 1]);
  });
});
