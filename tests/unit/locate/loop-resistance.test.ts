import { describe, expect, it } from 'vitest';
import {
  IEC60228_CLASS2_OHM_PER_KM,
  LocateInputError,
  loopResistanceMethod,
  MATERIALS,
  murrayLoop,
  resolveConductor,
  temperatureFactor,
} from '../../../shared/locate';

describe('conductor data', () => {
  it('uses the standard resistivities and temperature coefficients', () => {
    // IEC 60028: annealed copper 1/58 Ω·mm²/m = 0.017241 Ω·mm²/m, α20 = 0.00393 /K.
    expect(MATERIALS.copper.resistivity20OhmM * 1e6).toBeCloseTo(0.017241, 6);
    expect(MATERIALS.copper.alpha20PerK).toBe(0.00393);
    // IEC 60889: hard-drawn aluminium 0.028264 Ω·mm²/m, α20 = 0.00403 /K.
    expect(MATERIALS.aluminium.resistivity20OhmM * 1e6).toBeCloseTo(0.028264, 6);
    expect(MATERIALS.aluminium.alpha20PerK).toBe(0.00403);
  });

  it('corrects for temperature as IEC 60228 Annex B does', () => {
    // IEC 60228 Annex B (from memory): R_20 = R_t · 254.5/(234.5 + t) for copper, 248/(228 + t) for aluminium.
    for (const t of [0, 30, 70, 90]) {
      expect(temperatureFactor('copper', t)).toBeCloseTo((234.5 + t) / 254.5, 3);
      expect(temperatureFactor('aluminium', t)).toBeCloseTo((228 + t) / 248, 3);
    }
  });

  it('reads the IEC 60228 table and falls back to ρ/A', () => {
    // IEC 60228 class 2 maxima (from memory): 95 mm² copper 0.193 Ω/km, 95 mm² aluminium 0.320 Ω/km.
    expect(IEC60228_CLASS2_OHM_PER_KM.copper[95]).toBe(0.193);
    const [cu95, odd] = resolveConductor(
      [
        { lengthM: 100, material: 'copper', sizeMm2: 95 },
        { lengthM: 50, material: 'copper', sizeMm2: 100 },
      ],
      150,
      'c',
    );
    expect(cu95.ohmPerM20).toBeCloseTo(0.193e-3, 12);
    // 100 mm² is not a standard size: 0.017241/100 Ω/m = 0.17241 Ω/km, with a wider uncertainty.
    expect(odd.ohmPerM20 * 1000).toBeCloseTo(0.17241, 5);
    expect(odd.relativeU).toBeGreaterThan(cu95.relativeU);
  });

  it('refuses sections that do not add up to the run or name no size', () => {
    expect(() => resolveConductor([{ lengthM: 100, material: 'copper', sizeMm2: 95 }], 150, 'c')).toThrow(
      /add up to 100 m but the cable is 150 m/,
    );
    expect(() => resolveConductor([{ lengthM: 150, material: 'copper' }], 150, 'c')).toThrow(/size/);
    expect(() => resolveConductor([{ lengthM: 150, material: 'brass' as 'copper', sizeMm2: 10 }], 150, 'c')).toThrow(
      LocateInputError,
    );
    const badTemp = () =>
      murrayLoop(
        'm',
        { installedLengthM: 150 },
        { fromEnd: 'A', ratio: 0.2, faulty: [{ lengthM: 150, material: 'copper', sizeMm2: 95 }], temperatureC: 400 },
      );
    expect(badTemp).toThrow(/temperature/);
  });
});

describe('loop-resistance method for a low-resistance short', () => {
  it('divides the loop by the pair resistance per metre at the conductor temperature', () => {
    // Two 2.5 mm² copper conductors, 7.41 Ω/km at 20 °C (IEC 60228 maximum, from memory), at 30 °C:
    // 2 × 7.41 × (1 + 0.00393 × 10) = 15.4024 Ω/km; 3.080 Ω → 199.968 m (hand-worked).
    const e = loopResistanceMethod(
      'l',
      { installedLengthM: 500 },
      { fromEnd: 'A', loopOhm: 3.08, first: [{ lengthM: 500, material: 'copper', sizeMm2: 2.5 }], temperatureC: 30 },
    );
    expect(e.distanceFromEndM).toBeCloseTo(199.968, 3);
    // 2 K of temperature: 200 × 0.00393 × 2/1.0393 = 1.512 m; 2 % conductor data → 4.0 m (hand-worked).
    expect(Math.abs(e.budget.find((b) => b.label === 'conductor temperature')!.contributionM)).toBeCloseTo(1.512, 2);
    expect(e.standardUncertaintyM).toBeCloseTo(Math.hypot(1.512, 3.999, 0.0265), 2);
    expect(e.notes[0]).toMatch(/bolted/);
  });

  it('takes off the leads and half the largest fault resistance', () => {
    // Hand-worked: (3.08 − 0.02 − 0.1/2)/0.0154024 = 195.424 m; the short's 0.1/√12 Ω → 1.874 m.
    const e = loopResistanceMethod(
      'l',
      { installedLengthM: 500 },
      {
        fromEnd: 'A',
        loopOhm: 3.08,
        leadOhm: 0.02,
        faultOhmMax: 0.1,
        first: [{ lengthM: 500, material: 'copper', sizeMm2: 2.5 }],
        temperatureC: 30,
      },
    );
    expect(e.distanceFromEndM).toBeCloseTo(195.424, 3);
    expect(Math.abs(e.budget.find((b) => b.label === 'resistance of the short itself')!.contributionM)).toBeCloseTo(1.874, 3);
  });

  it('walks a pair of different conductors across a joint', () => {
    // 300 m of 95 mm² aluminium then 200 m of 35 mm² copper, both conductors alike, at 20 °C (IEC 60228 class 2):
    // first section 2 × 0.320 × 0.3 = 0.192 Ω; 0.3 Ω leaves 0.108 Ω at 2 × 0.524 Ω/km → 103.053 m → 403.053 m (hand-worked).
    const e = loopResistanceMethod(
      'l',
      { installedLengthM: 500 },
      {
        fromEnd: 'A',
        loopOhm: 0.3,
        first: [
          { lengthM: 300, material: 'aluminium', sizeMm2: 95 },
          { lengthM: 200, material: 'copper', sizeMm2: 35 },
        ],
        temperatureC: 20,
      },
    );
    expect(e.distanceFromEndM).toBeCloseTo(403.053, 3);
  });

  it('refuses a loop longer than the pair or shorter than the leads', () => {
    // The whole 500 m pair of 2.5 mm² at 20 °C is 7.41 Ω.
    const long = () =>
      loopResistanceMethod(
        'l',
        { installedLengthM: 500 },
        { fromEnd: 'A', loopOhm: 8, first: [{ lengthM: 500, material: 'copper', sizeMm2: 2.5 }], temperatureC: 20 },
      );
    expect(long).toThrow(LocateInputError);
    expect(long).toThrow(/more than the whole pair/);
    expect(() =>
      loopResistanceMethod(
        'l',
        { installedLengthM: 500 },
        { fromEnd: 'A', loopOhm: 0.01, leadOhm: 0.02, first: [{ lengthM: 500, material: 'copper', sizeMm2: 2.5 }] },
      ),
    ).toThrow(/no more than the test leads/);
  });
});
