import { describe, expect, it } from 'vitest';
import { decimateMinMax } from '../../../shared/trace';

describe('decimateMinMax', () => {
  it('keeps a one-sample spike in a long flat trace', () => {
    const n = 100_000;
    const x = new Float64Array(n).map((_, i) => i * 1e-9);
    const y = new Float64Array(n);
    y[54_321] = 0.8;
    y[77_777] = -0.3;
    const pts = decimateMinMax(x, y, 500);
    expect(pts.length).toBeLessThanOrEqual(1000);
    expect(pts.find((p) => p.y === 0.8)?.x).toBe(x[54_321]);
    expect(pts.find((p) => p.y === -0.3)?.x).toBe(x[77_777]);
  });

  it('keeps points in time order and returns short traces unchanged', () => {
    const x = new Float64Array([0, 1, 2, 3, 4, 5, 6, 7, 8, 9]);
    const y = new Float64Array([5, 1, 9, 2, 8, 3, 7, 4, 6, 0]);
    expect(decimateMinMax(x, y, 10).map((p) => p.y)).toEqual(Array.from(y));
    const pts = decimateMinMax(x, y, 2);
    // Buckets [0..4] and [5..9]: min 1 then max 9; max 7 then min 0.
    expect(pts.map((p) => p.y)).toEqual([1, 9, 7, 0]);
    expect(pts.map((p) => p.x)).toEqual([1, 2, 6, 9]);
  });
});
