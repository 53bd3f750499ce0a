import { describe, expect, it } from 'vitest';
import { covarianceOf, LocateInputError, singleEndedTdr, timingUncertaintyNs, twoEndedTdr } from '../../../shared/locate';

const contribution = (e: { budget: Array<{ label: string; contributionM: number }> }, label: string) =>
  e.budget.find((b) => b.label === label)?.contributionM;

describe('single-ended TDR reading as an estimate', () => {
  it('keeps a reading from end A as it is', () => {
    const e = singleEndedTdr('a', { installedLengthM: 900 }, { fromEnd: 'A', distanceM: 414.2, standardUncertaintyM: 62 });
    expect(e.distanceFromAM).toBeCloseTo(414.2, 9);
    expect(e.standardUncertaintyM).toBeCloseTo(62, 9);
    expect(e.label).toBe('TDR from end A');
  });

  it('places a reading from end B through the installed length, with its uncertainty', () => {
    // 900 − 500 = 400 m from A; u = √(8² + 6²) = 10 m with the length known to 6 m (hand-worked).
    const e = singleEndedTdr(
      'b',
      { installedLengthM: 900, installedLengthUM: 6 },
      { fromEnd: 'B', distanceM: 500, standardUncertaintyM: 8 },
    );
    expect(e.distanceFromEndM).toBe(500);
    expect(e.distanceFromAM).toBeCloseTo(400, 9);
    expect(e.standardUncertaintyM).toBeCloseTo(10, 6);
    expect(e.budget.find((b) => b.source === 'installed-length')?.contributionM).toBeCloseTo(6, 6);
  });

  it('splits the VF part out of the reading as a shared source', () => {
    // d = 400 m, u = 10 m, VF known to 2 %: VF part 400 × 0.02 = 8 m, the rest √(10² − 8²) = 6 m (hand-worked).
    // From end B the VF part pulls towards A: the sign flips.
    const a = singleEndedTdr(
      'a',
      { installedLengthM: 1000 },
      { fromEnd: 'A', distanceM: 400, standardUncertaintyM: 10, vfRelativeU: 0.02 },
    );
    expect(contribution(a, 'velocity factor')).toBeCloseTo(8, 6);
    expect(contribution(a, 'timing, sampling and edge of the reading')).toBeCloseTo(6, 6);
    const b = singleEndedTdr(
      'b',
      { installedLengthM: 1000 },
      { fromEnd: 'B', distanceM: 400, standardUncertaintyM: 10, vfRelativeU: 0.02 },
    );
    expect(contribution(b, 'velocity factor')).toBeCloseTo(-8, 6);
    expect(a.budget[0].source).toBe(b.budget[0].source);
  });

  it('refuses a reading beyond the cable or without an uncertainty', () => {
    const over = () => singleEndedTdr('a', { installedLengthM: 900 }, { fromEnd: 'A', distanceM: 950, standardUncertaintyM: 5 });
    expect(over).toThrow(LocateInputError);
    expect(over).toThrow(/950\.0 m from end A, outside the 900 m cable/);
    expect(() =>
      singleEndedTdr('a', { installedLengthM: 900 }, { fromEnd: 'A', distanceM: 100, standardUncertaintyM: 0 }),
    ).toThrow(/more than zero/);
    expect(() =>
      singleEndedTdr('a', { installedLengthM: 900 }, { fromEnd: 'C' as 'A', distanceM: 100, standardUncertaintyM: 1 }),
    ).toThrow(/A or B/);
  });
});

describe('two-ended TDR reading as an estimate', () => {
  it('gives L·t_A/(t_A + t_B) with the uncertainty of the times and the length', () => {
    // 1000 m, 4 µs and 6 µs: 400 m (hand-worked). Sensitivities (hand-worked):
    // ∂d/∂t_A = L·t_B/(t_A + t_B)² = 0.06 m/ns, ∂d/∂t_B = −L·t_A/(t_A + t_B)² = −0.04 m/ns, ∂d/∂L = t_A/(t_A + t_B) = 0.4.
    // With 1 ns on each time and 5 m on the length: u = √(0.06² + 0.04² + 2²) = 2.0013 m.
    const e = twoEndedTdr(
      'te',
      { installedLengthM: 1000, installedLengthUM: 5 },
      { roundTripANs: 4000, roundTripBNs: 6000, roundTripUNs: 1 },
    );
    expect(e.distanceFromAM).toBeCloseTo(400, 9);
    expect(contribution(e, 'round-trip time from end A')).toBeCloseTo(0.06, 6);
    expect(contribution(e, 'round-trip time from end B')).toBeCloseTo(-0.04, 6);
    expect(contribution(e, 'installed length')).toBeCloseTo(2, 6);
    expect(e.standardUncertaintyM).toBeCloseTo(2.0013, 4);
    // Implied VF 2L/(c·(t_A + t_B)) = 0.66713 (as in the two-ended tests).
    expect(e.notes).toContain('the two readings together imply a velocity factor of 0.6671');
  });

  it('refuses times that imply a velocity factor above 1', () => {
    // 1000 m in a 2 µs total round trip would need 2000/(c·2e-6) = 3.3 × c.
    expect(() =>
      twoEndedTdr('te', { installedLengthM: 1000 }, { roundTripANs: 800, roundTripBNs: 1200, roundTripUNs: 1 }),
    ).toThrow(/imply a velocity factor of 3\.336/);
  });
});

describe('timing shared between a single-ended and a two-ended reading of the same trace', () => {
  it('turns the reading back into a timing uncertainty and counts it as one error', () => {
    // d = VF·c·t/2 at VF 0.7: 1 ns is 0.7 × 299 792 458 × 1e-9/2 = 0.104927 m (c exact by the SI definition).
    // A reading of 419.7 m with 2 % VF (8.394 m) and that timing: back to 1 ns (hand-worked).
    const uA = Math.hypot(419.7 * 0.02, 0.104927);
    expect(timingUncertaintyNs(419.7, uA, 0.7, 0.02)).toBeCloseTo(1, 4);
    const run = { installedLengthM: 1000, installedLengthUM: 10 };
    const single = singleEndedTdr('a', run, {
      fromEnd: 'A',
      distanceM: 419.7,
      standardUncertaintyM: uA,
      vfRelativeU: 0.02,
      timingSource: 'trace-1',
    });
    const both = twoEndedTdr('te', run, {
      roundTripANs: 4000,
      roundTripBNs: 6000,
      roundTripUNs: 1,
      timingSourceA: 'trace-1',
      timingSourceB: 'trace-2',
    });
    // Covariance = 0.104927 m × (∂d/∂t_A = 0.06 m/ns × 1 ns) = 0.0062956 m² (hand-worked); nothing else is shared.
    const v = covarianceOf([single, both]);
    expect(v[0][1]).toBeCloseTo(0.0062956, 6);
    expect(v[1][0]).toBeCloseTo(v[0][1], 12);
  });
});
