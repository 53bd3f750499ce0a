import { describe, expect, it } from 'vitest';
import {
  assessVf,
  awgDiameterM,
  coax,
  delayNsPerFt,
  delayNsPerM,
  DerivationError,
  EPSILON_0,
  ETA_0,
  ftToM,
  lineFromLC,
  mToFt,
  MU_0,
  permittivityFromVf,
  twoWire,
  vfFromLC,
  vfFromPermittivity,
  USUAL_VF_RANGE,
} from '../../../shared/cable/derivations';
import { SPEED_OF_LIGHT_M_PER_S } from '../../../shared/cable/propagation';

const INCH = 0.0254; // exact by definition (1959 international yard and pound agreement)
const PF_PER_FT = 1e-12 / 0.3048;

/** |actual − expected| / expected */
const rel = (actual: number, expected: number) => Math.abs(actual - expected) / Math.abs(expected);

describe('VF from permittivity', () => {
  it('gives VF = 1 in vacuum, where μ0·ε0 = 1/c²', () => {
    expect(vfFromPermittivity(1, 1)).toBe(1);
    // CODATA 2018 recommended values: ε0 = 8.8541878128(13)e-12 F/m, μ0 = 1.25663706212(19)e-6 N/A².
    expect(rel(EPSILON_0, 8.8541878128e-12)).toBeLessThan(1e-9);
    expect(MU_0 * EPSILON_0 * SPEED_OF_LIGHT_M_PER_S ** 2).toBeCloseTo(1, 12);
    // Impedance of free space ≈ 376.730 313 Ω (CODATA 2018).
    expect(ETA_0).toBeCloseTo(376.730313, 5);
  });

  it('gives ≈ 0.66 for solid polyethylene, εr 2.25–2.3', () => {
    // Solid PE εr 2.26 and "polyethylene 2.29, VP 66 %": Standard Wire & Cable, "Formula for capacitance in
    // 2-conductor, shielded, non-shielded wires, coax", tables II and III. Solid-PE coax VF 0.66: the coax
    // data sheet compiled by P. Harden (NA5N), "Coaxial cable specifications", every PE-dielectric row.
    for (const er of [2.25, 2.26, 2.29, 2.3]) {
      const vf = vfFromPermittivity(er);
      expect(vf).toBeGreaterThan(0.655);
      expect(vf).toBeLessThan(0.67);
    }
    expect(vfFromPermittivity(2.26)).toBeCloseTo(0.665, 3);
  });

  it('gives ≈ 0.69 for PTFE, εr 2.1', () => {
    // "TFE 2.1, VP 69 %": Standard Wire & Cable, table II (as above); PTFE-dielectric coax VF 0.70 in the NA5N sheet.
    expect(vfFromPermittivity(2.1)).toBeCloseTo(0.69, 2);
  });

  it('takes μr into account and inverts', () => {
    expect(vfFromPermittivity(2, 2)).toBeCloseTo(0.5, 12); // 1/√4, from the formula
    expect(permittivityFromVf(0.66)).toBeCloseTo(2.2957, 4); // 1/0.66², from the formula
    expect(vfFromPermittivity(permittivityFromVf(0.82))).toBeCloseTo(0.82, 12);
  });

  it('refuses a permittivity below vacuum’s, naming the input', () => {
    expect(() => vfFromPermittivity(0.5)).toThrow(DerivationError);
    try {
      vfFromPermittivity(0);
    } catch (e) {
      expect((e as DerivationError).field).toBe('epsilonR');
    }
    expect(() => permittivityFromVf(1.2)).toThrow(/at most 1/);
  });
});

describe('VF from inductance and capacitance per unit length', () => {
  it('matches the handbook coax line constants', () => {
    // Handbook forms of the coax formulas in US units (Reference Data for Radio Engineers; as restated in
    // the idea2ic coax calculator page): C = 7.36·εr / log10(D/d) pF/ft, L = 0.14·log10(D/d) µH/ft,
    // Delay = 1.016·√εr ns/ft, Z0 = 138·log10(D/d)/√εr.
    const er = 2.26;
    const log = 0.5; // D/d = 10^0.5
    const c = ((7.36 * er) / log) * PF_PER_FT;
    const l = (0.14 * log * 1e-6) / 0.3048;
    const line = lineFromLC(l, c);
    expect(rel(line.vf, 1 / Math.sqrt(er))).toBeLessThan(0.005);
    expect(rel(line.z0Ohm, (138 * log) / Math.sqrt(er))).toBeLessThan(0.005);
    expect(rel(line.epsilonMuR, er)).toBeLessThan(0.01);
    expect(vfFromLC(l, c)).toBeCloseTo(line.vf, 12);
  });

  it('refuses zero or negative L and C', () => {
    expect(() => lineFromLC(0, 1e-10)).toThrow(DerivationError);
    expect(() => lineFromLC(2.5e-7, -1)).toThrow(/capacitance/);
  });
});

describe('coaxial line from D, d and εr', () => {
  // Conductor and dielectric diameters of the MIL-C-17 families, from the NA5N coax data sheet
  // ("Coaxial cable specifications"; also the Wikipedia "Coaxial cable" standards table:
  // RG-58/U 0.81 mm core, 2.9 mm dielectric, 50 Ω; RG-59/U 0.58 mm core, 3.7 mm dielectric, 75 Ω).
  it('comes out near 50 Ω for the common 50 Ω solid-PE family (RG-58/U: 0.032 in centre, 0.116 in PE)', () => {
    const line = coax({ innerDiameter: 0.032 * INCH, outerDiameter: 0.116 * INCH, epsilonR: 2.26 });
    expect(rel(line.z0Ohm, 50)).toBeLessThan(0.04);
    expect(line.vf).toBeCloseTo(0.665, 3);
    // The sheet lists 29 pF/ft for this cable.
    expect(rel(line.cFPerM / PF_PER_FT, 29)).toBeLessThan(0.05);
  });

  it('comes out near 75 Ω for the common 75 Ω solid-PE family (RG-59/U: 0.023 in centre, 0.146 in PE)', () => {
    const line = coax({ innerDiameter: 0.023 * INCH, outerDiameter: 0.146 * INCH, epsilonR: 2.26 });
    expect(rel(line.z0Ohm, 75)).toBeLessThan(0.04);
    // The sheet lists 21 pF/ft for this cable.
    expect(rel(line.cFPerM / PF_PER_FT, 21)).toBeLessThan(0.05);
  });

  it('agrees with the rule-of-thumb Z0 = (60/√εr)·ln(D/d) to within 0.1 %', () => {
    // 60 stands for η0/2π = 59.96 Ω (Pozar, Microwave Engineering, 4th ed., example 2.1 / Table 2.1).
    const line = coax({ innerDiameter: 1, outerDiameter: 3.5, epsilonR: 2.3 });
    expect(rel(line.z0Ohm, (60 / Math.sqrt(2.3)) * Math.log(3.5))).toBeLessThan(0.001);
  });

  it('has L·C = με whatever D/d, so the velocity depends on the dielectric alone', () => {
    for (const ratio of [1.5, 2.3, 3.6, 10, 100]) {
      for (const er of [1, 1.5, 2.26, 3.5]) {
        const line = coax({ innerDiameter: 1e-3, outerDiameter: ratio * 1e-3, epsilonR: er });
        expect(rel(line.lc, line.muEpsilon)).toBeLessThan(1e-12);
        expect(line.vf).toBeCloseTo(1 / Math.sqrt(er), 12);
      }
    }
  });

  it('refuses D ≤ d', () => {
    expect(() => coax({ innerDiameter: 2, outerDiameter: 2, epsilonR: 2.3 })).toThrow(DerivationError);
  });
});

describe('two-wire line from d, s and εr', () => {
  it('gives ≈ 600 Ω for No. 12 wire at 6 in spacing in air', () => {
    // The classic "600 Ω open-wire line" of No. 12 wire spaced 6 in: ARRL Antenna Book (from memory).
    // No. 12 AWG = 2.053 mm (ASTM B258 table).
    const line = twoWire({ wireDiameter: awgDiameterM(12), spacing: 6 * INCH, epsilonR: 1 });
    expect(rel(line.z0Ohm, 600)).toBeLessThan(0.01);
    expect(line.vf).toBeCloseTo(1, 12);
  });

  it('reduces to the handbook air-line formula Z0 = 276·log10(2s/d) when s ≫ d', () => {
    // ARRL Handbook, parallel-conductor line in air: Z0 = 276 log10(2S/d). 276 ≈ 120·ln 10 = 276.3.
    const d = 1.024e-3; // No. 18 AWG (ASTM B258)
    const s = 25.4e-3;
    const line = twoWire({ wireDiameter: d, spacing: s, epsilonR: 1 });
    expect(rel(line.thinWire.z0Ohm, 276 * Math.log10((2 * s) / d))).toBeLessThan(0.002);
    expect(Math.abs(line.thinWireError)).toBeLessThan(1e-3);
  });

  it('shows where the thin-wire limit breaks down (wires nearly touching)', () => {
    // acosh(1.5) = 0.9624 vs ln(3) = 1.0986, from the functions' definitions.
    const line = twoWire({ wireDiameter: 1, spacing: 1.5, epsilonR: 1 });
    expect(line.thinWireError).toBeCloseTo(1.0986 / 0.9624 - 1, 3);
  });

  it('divides Z0 by √εr and keeps L·C = με in both the exact and the thin-wire forms', () => {
    const air = twoWire({ wireDiameter: 0.8e-3, spacing: 7e-3, epsilonR: 1 });
    const pe = twoWire({ wireDiameter: 0.8e-3, spacing: 7e-3, epsilonR: 2.26 });
    expect(pe.z0Ohm).toBeCloseTo(air.z0Ohm / Math.sqrt(2.26), 9);
    for (const l of [pe, pe.thinWire, air, air.thinWire]) expect(rel(l.lc, l.muEpsilon)).toBeLessThan(1e-12);
  });

  it('refuses a spacing not larger than the wire', () => {
    expect(() => twoWire({ wireDiameter: 2, spacing: 1, epsilonR: 1 })).toThrow(/spacing/);
  });
});

describe('delay and units', () => {
  it('takes light ≈ 1.0167 ns to travel a foot and ≈ 3.3356 ns a metre', () => {
    // R. Hranac, "Velocity of propagation", Communications Technology, March 2010: 1/983,571,056.43 ft/s = 1.0167 ns/ft.
    expect(delayNsPerFt(1)).toBeCloseTo(1.0167, 4);
    expect(delayNsPerM(1)).toBeCloseTo(3.33564, 5);
  });

  it('gives ≈ 5.05 ns/m at VF 0.66', () => {
    // 3.33564 / 0.66 from the formula; "about 5 ns per metre in PE coax" is common practice.
    expect(delayNsPerM(0.66)).toBeCloseTo(5.054, 3);
    // Handbook form: delay = 1.016·√εr ns/ft (idea2ic coax page); εr = 1/0.66².
    expect(rel(delayNsPerFt(0.66), 1.016 / 0.66)).toBeLessThan(0.001);
  });

  it('converts m ↔ ft with the international foot', () => {
    // 1 ft = 0.3048 m exactly (1959 agreement).
    expect(ftToM(1)).toBe(0.3048);
    expect(mToFt(100)).toBeCloseTo(328.084, 3);
    expect(ftToM(mToFt(412.3))).toBeCloseTo(412.3, 10);
  });

  it('gives AWG wire diameters from the gauge formula', () => {
    // ASTM B258 table: No. 12 = 0.0808 in (2.053 mm), No. 24 = 0.0201 in (0.511 mm), No. 0000 = 0.4600 in.
    expect(awgDiameterM(12) / INCH).toBeCloseTo(0.0808, 4);
    expect(awgDiameterM(24) / INCH).toBeCloseTo(0.0201, 4);
    expect(awgDiameterM(-3) / INCH).toBeCloseTo(0.46, 4);
    expect(() => awgDiameterM(12.5)).toThrow(DerivationError);
  });
});

describe('a derived VF checked before it is shown or offered to the library', () => {
  it('refuses a VF faster than light, such as L and C typed in the wrong units', () => {
    // 250 nH/m with 1 pF/m (a coax's 100 pF/m typed as 1): u = 1/√(2.5e-19) = 2e9 m/s, VF 6.67 — faster than light.
    const line = lineFromLC(250e-9, 1e-12);
    expect(line.vf).toBeGreaterThan(1);
    const verdict = assessVf(line.vf);
    expect(verdict.level).toBe('refuse');
    expect(verdict.level !== 'ok' && verdict.message).toMatch(/VF 6\.671 would be faster than light/);
    expect(assessVf(3.336).level).toBe('refuse');
    expect(assessVf(Number.NaN).level).toBe('refuse');
  });

  it('passes the usual range and warns outside it', () => {
    // Usual cable VFs 0.4–0.99 (common practice: PVC pairs about 0.45–0.6, solid PE 0.66, foam 0.8–0.88, open wire up to 0.99).
    expect(USUAL_VF_RANGE).toEqual({ min: 0.4, max: 0.99 });
    for (const vf of [0.45, 0.66, 0.82, 0.95, 0.99]) expect(assessVf(vf).level).toBe('ok');
    const air = assessVf(vfFromPermittivity(1));
    expect(air.level).toBe('warn');
    expect(air.level !== 'ok' && air.message).toMatch(/speed of light/);
    const slow = assessVf(vfFromPermittivity(12)); // εr 12 → VF 0.289
    expect(slow.level).toBe('warn');
    expect(slow.level !== 'ok' && slow.message).toMatch(/VF 0\.2887 is slower than cables usually are/);
  });
});
