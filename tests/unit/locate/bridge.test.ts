import { describe, expect, it } from 'vitest';
import { LocateInputError, murrayLoop, varleyLoop, type ConductorSection } from '../../../shared/locate';

const MILE_M = 1609.344; // international mile, exact by definition
const uniform = (lengthM: number, sizeMm2 = 35): ConductorSection[] => [{ lengthM, material: 'copper', sizeMm2 }];

describe('Murray loop', () => {
  it('reproduces the published example with the loop measured and the good wire unknown', () => {
    // Hawkins Electrical Guide vol. 3 (1914), Murray loop "Case II": wire of 16.46 Ω per mile, loop 54.07 Ω,
    // reading 332 (of 1000): d = 332 × 54.07 ÷ (1000 × 16.46) = 1.09 miles. The run length (3 miles) is not in the
    // example and does not enter the result.
    const e = murrayLoop(
      'm',
      { installedLengthM: 3 * MILE_M },
      {
        fromEnd: 'A',
        ratio: 0.332,
        loopOhm: 54.07,
        sound: 'unknown',
        faulty: [{ lengthM: 3 * MILE_M, material: 'copper', ohmPerM20: 16.46 / MILE_M }],
        temperatureC: 20,
        temperatureUK: 0,
      },
    );
    expect(e.distanceFromEndM / MILE_M).toBeCloseTo(1.09, 2);
    expect(e.distanceFromEndM / MILE_M).toBeCloseTo(1.0906, 4);
    // Without the sound conductor the wire's own resistance per metre matters: 1 % of it is 1 % of the distance.
    expect(Math.abs(e.budget.find((b) => b.label.startsWith('conductor data'))!.contributionM)).toBeCloseTo(
      0.01 * e.distanceFromEndM,
      3,
    );
  });

  it('gives Q/(P+Q) of the loop length for two equal conductors', () => {
    // V. K. Mehta, Principles of Power System, Murray loop worked example (from memory): 500 m of cable at
    // 1.6 Ω/km looped with an equal sound cable, arms at balance 3 : 1 → 1/4 × 1000 m = 250 m.
    const e = murrayLoop(
      'm',
      { installedLengthM: 500 },
      {
        fromEnd: 'A',
        soundSideArmOhm: 3,
        faultySideArmOhm: 1,
        faulty: [{ lengthM: 500, material: 'copper', ohmPerM20: 1.6e-3 }],
      },
    );
    expect(e.distanceFromEndM).toBeCloseTo(250, 9);
    // Equal conductors: the resistance per metre and the temperature cancel; only the ratio's resolution is left,
    // 0.001/√12 × 1000 m = 0.2887 m (GUM F.2.2.1, hand-worked).
    expect(e.budget.map((b) => b.label)).toEqual(['bridge ratio reading']);
    expect(e.standardUncertaintyM).toBeCloseTo(0.2887, 4);
  });

  it('converts sections of different size to an equivalent length', () => {
    // 100 m of 120 mm² then 100 m of 240 mm² copper, ratio 0.4 (hand-worked with IEC 60228 class 2 maxima
    // 0.153 and 0.0754 Ω/km): the 240 mm² section is 100 × 0.0754/0.153 = 49.281 m of 120 mm²; the loop is
    // 2 × 149.281 = 298.562 m; 0.4 of it is 119.425 m, i.e. 19.425 m of 120 mm² past the joint =
    // 19.425 × 0.153/0.0754 = 39.416 m of 240 mm² → 139.416 m from A.
    const route: ConductorSection[] = [
      { lengthM: 100, material: 'copper', sizeMm2: 120 },
      { lengthM: 100, material: 'copper', sizeMm2: 240 },
    ];
    const a = murrayLoop('m', { installedLengthM: 200 }, { fromEnd: 'A', ratio: 0.4, faulty: route });
    expect(a.distanceFromAM).toBeCloseTo(139.416, 3);
    // From end B the 240 mm² section comes first: 119.425 − 49.281 = 70.144 m of 120 mm² past the joint →
    // 170.144 m from B, 29.856 m from A (hand-worked).
    const b = murrayLoop('m', { installedLengthM: 200 }, { fromEnd: 'B', ratio: 0.4, faulty: route });
    expect(b.distanceFromEndM).toBeCloseTo(170.144, 3);
    expect(b.distanceFromAM).toBeCloseTo(29.856, 3);
    // With resistances exactly 2 : 1 (ρ/A) the same reading is 100 + 2 × 20 = 140 m (hand-worked).
    const exact = murrayLoop(
      'm',
      { installedLengthM: 200 },
      {
        fromEnd: 'A',
        ratio: 0.4,
        faulty: [
          { lengthM: 100, material: 'copper', ohmPerM20: 2e-4 },
          { lengthM: 100, material: 'copper', ohmPerM20: 1e-4 },
        ],
      },
    );
    expect(exact.distanceFromAM).toBeCloseTo(140, 9);
  });

  it('refuses a ratio outside 0–1 and a balance past the far end', () => {
    const bad = () => murrayLoop('m', { installedLengthM: 500 }, { fromEnd: 'A', ratio: 1.2, faulty: uniform(500) });
    expect(bad).toThrow(LocateInputError);
    expect(bad).toThrow(/ratio must be between 0 and 1, got 1\.2/);
    // 0.6 of a loop of two equal conductors lies on the sound conductor: the leads are swapped.
    expect(() => murrayLoop('m', { installedLengthM: 500 }, { fromEnd: 'A', ratio: 0.6, faulty: uniform(500) })).toThrow(
      /swapped/,
    );
    expect(() =>
      murrayLoop('m', { installedLengthM: 500 }, { fromEnd: 'A', ratio: 0.3, faulty: uniform(500), sound: 'unknown' }),
    ).toThrow(/measured loop resistance/);
  });

  it('notes a measured loop far from the conductor data', () => {
    // 2 × 500 m × 0.524 Ω/km = 0.524 Ω at 20 °C (IEC 60228 class 2, 35 mm² copper); 0.70 Ω is 34 % above.
    const e = murrayLoop(
      'm',
      { installedLengthM: 500 },
      { fromEnd: 'A', ratio: 0.3, loopOhm: 0.7, faulty: uniform(500), temperatureC: 20 },
    );
    expect(e.notes[0]).toMatch(/measured loop \(0\.7000 Ω\) is 34 % above what the conductor data give at 20 °C \(0\.5240 Ω\)/);
  });
});

describe('Varley loop', () => {
  it('gives X = (a·L − b·S)/(a + b) from the loop and the rheostat', () => {
    // Hand-worked from the balance a/b = (S + X)/(L − X): equal arms, loop 1.000 Ω, S = 0.200 Ω →
    // X = 0.400 Ω, 40 % of the loop of two equal 1000 m conductors → 800 m.
    const equal = varleyLoop(
      'v',
      { installedLengthM: 1000 },
      { fromEnd: 'A', armRatio: 1, rheostatOhm: 0.2, loopOhm: 1, faulty: uniform(1000) },
    );
    expect(equal.distanceFromEndM).toBeCloseTo(800, 9);
    // Arms 2 : 1 and S = 0.8 Ω: X = (2 × 1 − 0.8)/3 = 0.4 Ω → the same 800 m.
    const twoToOne = varleyLoop(
      'v',
      { installedLengthM: 1000 },
      { fromEnd: 'A', armRatio: 2, rheostatOhm: 0.8, loopOhm: 1, faulty: uniform(1000) },
    );
    expect(twoToOne.distanceFromEndM).toBeCloseTo(800, 9);
    // Resolution 0.01 Ω on S and L: ∂d/∂S = −1000 m/Ω, ∂d/∂L = 200 m/Ω (equal arms) → u = 0.01/√12 × √(1000² + 200²) = 2.944 m.
    expect(equal.standardUncertaintyM).toBeCloseTo(2.944, 3);
  });

  it('agrees with the Murray loop on the same fault', () => {
    // A fault 300 m along a 1000 m pair of 35 mm² copper (r per metre): X = 300r, Y = 1700r, loop 2000r.
    // Murray: ratio 300/2000 = 0.15. Varley, equal arms: S = L − 2X = 1400r. Both must say 300 m.
    const r = 0.524e-3;
    const m = murrayLoop('m', { installedLengthM: 1000 }, { fromEnd: 'A', ratio: 0.15, faulty: uniform(1000) });
    const v = varleyLoop(
      'v',
      { installedLengthM: 1000 },
      { fromEnd: 'A', armRatio: 1, rheostatOhm: 1400 * r, loopOhm: 2000 * r, faulty: uniform(1000) },
    );
    expect(m.distanceFromEndM).toBeCloseTo(300, 9);
    expect(v.distanceFromEndM).toBeCloseTo(300, 9);
  });

  it('works the loop out from the conductor data and temperature when it was not measured', () => {
    // 1000 m of 35 mm² copper, 0.524 Ω/km (IEC 60228 class 2): loop 1.048 Ω at 20 °C. S = 0.2 Ω, equal arms:
    // X = (1.048 − 0.2)/2 = 0.424 Ω → 0.424/0.000524 = 809.16 m (hand-worked).
    const e = varleyLoop(
      'v',
      { installedLengthM: 1000 },
      { fromEnd: 'A', armRatio: 1, rheostatOhm: 0.2, faulty: uniform(1000), temperatureC: 20 },
    );
    expect(e.distanceFromEndM).toBeCloseTo(809.16, 2);
    // Then the conductor data and temperature matter: 2 % on r moves X/L by S/(2L)·2 % → 0.2/1.048 × 0.02 × 1000 = 3.817 m.
    expect(Math.abs(e.budget.find((b) => b.label.startsWith('conductor data'))!.contributionM)).toBeCloseTo(3.817, 2);
    expect(e.budget.some((b) => b.label === 'conductor temperature')).toBe(true);
  });

  it('refuses a rheostat that puts the fault before the test end', () => {
    expect(() =>
      varleyLoop(
        'v',
        { installedLengthM: 1000 },
        { fromEnd: 'A', armRatio: 1, rheostatOhm: 1.2, loopOhm: 1, faulty: uniform(1000) },
      ),
    ).toThrow(/before the test end/);
  });
});
