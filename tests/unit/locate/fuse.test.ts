import { describe, expect, it } from 'vitest';
import { chiSquare95, fuseEstimates, LocateInputError, singleEndedTdr, type LocationEstimate } from '../../../shared/locate';

const run = { installedLengthM: 900 };
const tdrA = (id: string, d: number, u: number) =>
  singleEndedTdr(id, run, { fromEnd: 'A', distanceM: d, standardUncertaintyM: u, label: id });

/** An estimate with a hand-made budget, for the covariance cases. */
function estimate(id: string, x: number, budget: Array<[string, number]>): LocationEstimate {
  return {
    id,
    method: 'capacitance',
    label: id,
    fromEnd: 'A',
    distanceFromEndM: x,
    distanceFromAM: x,
    standardUncertaintyM: Math.sqrt(budget.reduce((s, [, c]) => s + c * c, 0)),
    budget: budget.map(([source, contributionM]) => ({ source, label: source, contributionM })),
    notes: [],
  };
}

describe('fusing location estimates', () => {
  it('combines 400 ± 8 m and 414 ± 62 m into 400.2 ± 7.9 m', () => {
    // Hand-worked inverse-variance mean: (400/8² + 414/62²)/(1/8² + 1/62²) = 400.229 m,
    // u = (1/8² + 1/62²)^(-1/2) = 7.934 m; χ² = 14²/(8² + 62²) = 0.0502 < 3.841.
    const f = fuseEstimates([tdrA('near', 400, 8), tdrA('far', 414, 62)], 900);
    expect(f.consistent).toBe(true);
    expect(f.distanceFromAM).toBeCloseTo(400.229, 3);
    expect(f.standardUncertaintyM).toBeCloseTo(7.934, 3);
    expect(f.test!.statistic).toBeCloseTo(0.0502, 4);
    // 95 % window, k = 2 (JCGM 100:2008 §6.2.2): 400.229 ± 2 × 7.934 = 384.361 … 416.098 m (hand-worked).
    expect(f.windowStartM).toBeCloseTo(384.361, 2);
    expect(f.windowEndM).toBeCloseTo(416.098, 2);
    expect(f.coverageFactor).toBe(2);
    // Weights 1/64 and 1/3844 normalised: 0.98362 and 0.01638 (hand-worked).
    expect(f.methods.map((m) => m.weight)).toEqual([expect.closeTo(0.98362, 4), expect.closeTo(0.01638, 4)]);
    expect(f.outlier).toBeNull();
    expect(f.checks).toEqual([]);
  });

  it('flags 400 ± 8 m and 480 ± 8 m as inconsistent and does not average them', () => {
    // χ² = 80²/(8² + 8²) = 50 > 3.841 (chi-square, 1 degree of freedom, 95 %); pairwise limit 1.96·√128 = 22.17 m (hand-worked).
    const f = fuseEstimates([tdrA('first', 400, 8), tdrA('second', 480, 8)], 900);
    expect(f.consistent).toBe(false);
    expect(f.test!.statistic).toBeCloseTo(50, 9);
    expect(f.test!.birgeRatio).toBeCloseTo(Math.sqrt(50), 9);
    expect(f.distanceFromAM).toBeNull();
    expect(f.windowStartM).toBeNull();
    expect(f.methods.every((m) => !m.used)).toBe(true);
    expect(f.outlier).toBeNull();
    expect(f.disagreements).toEqual([{ a: 'first', b: 'second', differenceM: 80, limitM: expect.closeTo(22.17, 2) }]);
    expect(f.verdict).toMatch(/disagree/);
    expect(f.verdict).toMatch(/third, independent method/);
    expect(f.checks).toContain('the velocity factor: calibrate it on a known length of the same cable');
  });

  it('names the one reading that stands apart and locates from the others', () => {
    // 400 ± 8 and 404 ± 10 agree; 480 ± 8 does not. Without it (hand-worked):
    // x̂ = (400/64 + 404/100)/(1/64 + 1/100) = 401.561 m, u = 0.025625^(-1/2) = 6.247 m;
    // 480 − 401.561 = 78.439 m over √(64 + 39.024) = 10.150 m → 7.73 σ.
    const f = fuseEstimates([tdrA('a', 400, 8), tdrA('b', 404, 10), tdrA('c', 480, 8)], 900);
    expect(f.consistent).toBe(false);
    expect(f.outlier).toMatchObject({ id: 'c', offsetM: expect.closeTo(78.439, 2), sigmas: expect.closeTo(7.728, 2) });
    expect(f.distanceFromAM).toBeCloseTo(401.561, 3);
    expect(f.standardUncertaintyM).toBeCloseTo(6.247, 3);
    expect(f.methods.map((m) => m.used)).toEqual([true, true, false]);
    expect(f.verdict).toMatch(/c stands apart, 78\.4 m further from end A/);
  });

  it('gives no location when leaving out any one reading still leaves a disagreement', () => {
    // 300, 400, 500 ± 8: every pair is 100 m or more apart against a 22.2 m limit.
    const f = fuseEstimates([tdrA('a', 300, 8), tdrA('b', 400, 8), tdrA('c', 500, 8)], 900);
    expect(f.consistent).toBe(false);
    expect(f.outlier).toBeNull();
    expect(f.distanceFromAM).toBeNull();
    expect(f.disagreements).toHaveLength(3);
  });

  it('counts a shared error once (generalised least squares)', () => {
    // 100 m (own 2.236 m, shared 2 m) and 106 m (own 3.464 m, shared 2 m): V = [[9, 4], [4, 16]].
    // Weights (σ₂² − V₁₂, σ₁² − V₁₂)/(σ₁² + σ₂² − 2V₁₂) = (12, 5)/17; x̂ = (1200 + 530)/17 = 101.765 m;
    // u² = (σ₁²σ₂² − V₁₂²)/(σ₁² + σ₂² − 2V₁₂) = 128/17 → u = 2.744 m (Lyons, Gibaut & Clifford 1988, two correlated estimates; hand-worked).
    const f = fuseEstimates(
      [
        estimate('one', 100, [
          ['own-1', Math.sqrt(5)],
          ['common', 2],
        ]),
        estimate('two', 106, [
          ['own-2', Math.sqrt(12)],
          ['common', 2],
        ]),
      ],
      900,
    );
    expect(f.methods.map((m) => m.weight)).toEqual([expect.closeTo(12 / 17, 9), expect.closeTo(5 / 17, 9)]);
    expect(f.distanceFromAM).toBeCloseTo(101.765, 3);
    expect(f.standardUncertaintyM).toBeCloseTo(Math.sqrt(128 / 17), 6);
  });

  it('cancels a velocity factor error between single-ended readings from the two ends', () => {
    // A 1000 m run, the fault at 400 m, the VF 5 % high: from A 420 m, from B 1.05 × 600 = 630 m (370 m from A).
    // The combination free of the VF error weighs them 0.6/0.4 (400·w₁ = 600·w₂): 0.6·420 + 0.4·370 = 400 m (hand-worked).
    const r = { installedLengthM: 1000 };
    const a = singleEndedTdr('a', r, {
      fromEnd: 'A',
      distanceM: 420,
      standardUncertaintyM: Math.hypot(21, 0.5),
      vfRelativeU: 0.05,
    });
    const b = singleEndedTdr('b', r, {
      fromEnd: 'B',
      distanceM: 630,
      standardUncertaintyM: Math.hypot(31.5, 0.5),
      vfRelativeU: 0.05,
    });
    const f = fuseEstimates([a, b], 1000);
    expect(f.consistent).toBe(true);
    expect(f.distanceFromAM).toBeCloseTo(400, 1);
    expect(f.methods.map((m) => m.weight)).toEqual([expect.closeTo(0.6, 2), expect.closeTo(0.4, 2)]);
    // What is left is the timing part: √(0.6² + 0.4²) × 0.5 = 0.36 m (hand-worked).
    expect(f.standardUncertaintyM).toBeCloseTo(0.36, 2);
    // Taken as independent they would be averaged with the VF error in: well off 400 m.
    const naive = fuseEstimates(
      [
        tdrA('a', 420, Math.hypot(21, 0.5)),
        singleEndedTdr('b', r, { fromEnd: 'B', distanceM: 630, standardUncertaintyM: Math.hypot(31.5, 0.5) }),
      ].map((e) => ({ ...e, budget: e.budget.map((l) => ({ ...l, source: `${e.id}:${l.source}` })) })),
      1000,
    );
    expect(Math.abs(naive.distanceFromAM! - 400)).toBeGreaterThan(4);
  });

  it('suggests the VF or the length when the two single-ended readings do not add up to the run', () => {
    // 420 + 630 = 1050 m on a 1000 m run: 5.0 % (hand-worked).
    const r = { installedLengthM: 1000 };
    const a = singleEndedTdr('a', r, { fromEnd: 'A', distanceM: 420, standardUncertaintyM: 2 });
    const b = singleEndedTdr('b', r, { fromEnd: 'B', distanceM: 630, standardUncertaintyM: 2 });
    const f = fuseEstimates([a, b], 1000);
    expect(f.consistent).toBe(false);
    expect(f.checks[0]).toBe(
      'the TDR readings from the two ends add up to 1050.0 m on a 1000.0 m run: the velocity factor is about 5.0 % too high, or the run is longer than recorded (slack)',
    );
  });

  it('reports one reading as it is', () => {
    const f = fuseEstimates([tdrA('only', 250, 5)], 900);
    expect(f.consistent).toBe(true);
    expect(f.test).toBeNull();
    expect(f.distanceFromAM).toBe(250);
    expect(f.standardUncertaintyM).toBeCloseTo(5, 9);
    expect(f.methods[0].weight).toBe(1);
  });

  it('refuses no readings, a repeated id and readings with the same information', () => {
    expect(() => fuseEstimates([], 900)).toThrow(LocateInputError);
    expect(() => fuseEstimates([tdrA('x', 1, 1), tdrA('x', 2, 1)], 900)).toThrow(/both called 'x'/);
    const same = [estimate('p', 10, [['s', 1]]), estimate('q', 10, [['s', 1]])];
    expect(() => fuseEstimates(same, 900)).toThrow(/same information/);
  });
});

describe('chi-square 95 % points', () => {
  it('match the published table and stay close beyond it', () => {
    // NIST/SEMATECH e-Handbook §1.3.6.7.4: χ²₀.₉₅(1) = 3.841, (2) = 5.991, (10) = 18.307, (20) = 31.410, (30) = 43.773.
    expect(chiSquare95(1)).toBe(3.841);
    expect(chiSquare95(2)).toBe(5.991);
    expect(chiSquare95(10)).toBe(18.307);
    expect(chiSquare95(20)).toBeCloseTo(31.41, 1);
    expect(chiSquare95(30)).toBeCloseTo(43.773, 1);
  });
});
