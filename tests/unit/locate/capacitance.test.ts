import { describe, expect, it } from 'vitest';
import { capacitanceMethod, LocateInputError } from '../../../shared/locate';

const nF = 1e-9;

describe('capacitance method for an open conductor', () => {
  it('divides by the capacitance per metre', () => {
    // Hand-worked: 20.8 nF on a pair of 52 nF/km → 400 m. Uncertainty: 5 % on the per-metre value → 20 m;
    // ±1 % meter (rectangular) → 400 × 0.01/√3 = 2.309 m; u = √(20² + 2.309²) = 20.133 m.
    const e = capacitanceMethod('c', { installedLengthM: 1000 }, { fromEnd: 'A', measuredF: 20.8 * nF, perMF: 52e-12 });
    expect(e.distanceFromEndM).toBeCloseTo(400, 9);
    expect(e.standardUncertaintyM).toBeCloseTo(20.133, 3);
  });

  it('compares with a sound conductor of the same cable, where the meter gain cancels', () => {
    // Hand-worked: 1000 × 20.8/52 = 400 m, from end B → 600 m from A. Left: 1 % non-uniformity → 4 m,
    // and the 1 pF resolution (≈ 0.006 m); the meter's ±1 % drops out of the ratio.
    const e = capacitanceMethod('c', { installedLengthM: 1000 }, { fromEnd: 'B', measuredF: 20.8 * nF, soundF: 52 * nF });
    expect(e.distanceFromEndM).toBeCloseTo(400, 9);
    expect(e.distanceFromAM).toBeCloseTo(600, 9);
    expect(e.budget.some((b) => b.label === 'meter accuracy')).toBe(false);
    expect(e.standardUncertaintyM).toBeCloseTo(4, 2);
  });

  it('takes the two ends of the broken conductor without a per-metre value', () => {
    // Hand-worked: 1000 × 20.8/(20.8 + 31.2) = 400 m; with 0.4 nF of leads off each: 1000 × 20.4/(20.4 + 30.8) = 398.4375 m.
    const e = capacitanceMethod('c', { installedLengthM: 1000 }, { fromEnd: 'A', measuredF: 20.8 * nF, otherEndF: 31.2 * nF });
    expect(e.distanceFromEndM).toBeCloseTo(400, 9);
    const leads = capacitanceMethod(
      'c',
      { installedLengthM: 1000 },
      { fromEnd: 'A', measuredF: 20.8 * nF, otherEndF: 31.2 * nF, leadF: 0.4 * nF },
    );
    expect(leads.distanceFromEndM).toBeCloseTo(398.4375, 6);
  });

  it("refuses a capacitance above the whole cable's", () => {
    const sound = () => capacitanceMethod('c', { installedLengthM: 1000 }, { fromEnd: 'A', measuredF: 60 * nF, soundF: 52 * nF });
    expect(sound).toThrow(LocateInputError);
    expect(sound).toThrow(/reads 60\.00 nF, above the whole cable's 52\.00 nF/);
    // 1000 m at 52 pF/m is 52 nF.
    expect(() => capacitanceMethod('c', { installedLengthM: 1000 }, { fromEnd: 'A', measuredF: 53 * nF, perMF: 52e-12 })).toThrow(
      /above the whole cable's 52\.00 nF/,
    );
    expect(() => capacitanceMethod('c', { installedLengthM: 1000 }, { fromEnd: 'A', measuredF: 20 * nF })).toThrow(/exactly one/);
  });
});
