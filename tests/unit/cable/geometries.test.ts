import { describe, expect, it } from 'vitest';
import { awgDiameterM, coax, DerivationError, derivationReference, twoWire } from '../../../shared/cable/derivations';
import { agm, ellipticK } from '../../../shared/cable/geometries/elliptic';
import { shieldedPair } from '../../../shared/cable/geometries/shielded-pair';
import { stripline, STRIPLINE_FORMULAS, striplineFringing, thinStripZ0Air } from '../../../shared/cable/geometries/stripline';
import { twistAngleDeg, twistedPair } from '../../../shared/cable/geometries/twisted-pair';
import { mixPermittivity, twoDielectricLine } from '../../../shared/cable/geometries/two-dielectrics';
import { EPSILON_0, SPEED_OF_LIGHT_M_PER_S } from '../../../shared/cable/propagation';

const MM = 1e-3;
const c = SPEED_OF_LIGHT_M_PER_S;
/** |actual − expected| / expected */
const rel = (actual: number, expected: number) => Math.abs(actual - expected) / Math.abs(expected);

describe('the complete elliptic integral behind the exact stripline', () => {
  it('matches tabulated values of K(k)', () => {
    // Abramowitz & Stegun, Handbook of Mathematical Functions, Table 17.1: K(m = 0) = π/2, K(m = 0.5) = 1.854074677.
    expect(ellipticK(0)).toBeCloseTo(Math.PI / 2, 14);
    expect(ellipticK(Math.SQRT1_2)).toBeCloseTo(1.854074677, 9);
    // Gauss's constant: 1/AGM(1, √2) = 0.83462684167407318… (OEIS A014549).
    expect(1 / agm(1, Math.SQRT2)).toBeCloseTo(0.834626841674073, 13);
  });
});

describe('stripline', () => {
  it('gives 50 Ω for the 50 Ω stripline on a 2.2 laminate of Pozar’s worked example', () => {
    // D. M. Pozar, Microwave Engineering, 4th ed., §3.7, Example 3.5: b = 0.32 cm, εr = 2.20, a 50 Ω line
    // needs W = 0.266 cm (from the section's curve fit, which is "accurate to about 1 %" of the exact value).
    const line = stripline({ width: 2.66 * MM, groundSpacing: 3.2 * MM, epsilonR: 2.2 });
    expect(line.formula).toBe(STRIPLINE_FORMULAS.thinExact);
    expect(rel(line.z0Ohm, 50)).toBeLessThan(0.01);
    // A uniformly filled line: VF = 1/√2.2 = 0.6742 whatever W and b are.
    expect(line.vf).toBeCloseTo(1 / Math.sqrt(2.2), 12);
    // The same example's strip, 0.01 mm thick: the thickness lowers Z0 a little (Cohn's wide-strip form).
    const thick = stripline({ width: 2.66 * MM, groundSpacing: 3.2 * MM, thickness: 0.01 * MM, epsilonR: 2.2 });
    expect(thick.formula).toBe(STRIPLINE_FORMULAS.thickWide);
    expect(thick.z0Ohm).toBeLessThan(line.z0Ohm);
    expect(rel(thick.z0Ohm, 50)).toBeLessThan(0.015);
  });

  it('agrees with Pozar’s curve fit to about 1 % from W/b 0.1 to 3', () => {
    // Pozar, Microwave Engineering, 4th ed., §3.7: Z0 = 30π/√εr · b/(We + 0.441·b),
    // We/b = W/b − (0 for W/b > 0.35, (0.35 − W/b)² below), "accurate to about 1 %" of the exact result.
    for (const wb of [0.1, 0.2, 0.35, 0.5, 0.8, 1, 1.5, 2, 3]) {
      const we = wb - (wb < 0.35 ? (0.35 - wb) ** 2 : 0);
      const fit = (30 * Math.PI) / (we + 0.441);
      expect(rel(thinStripZ0Air(wb), fit)).toBeLessThan(0.015);
    }
  });

  it('has Cohn’s fringing term 2·ln 2/π = 0.441 for a thin strip, the constant in Pozar’s fit', () => {
    // Pozar §3.7 (0.441); Cohn 1955, fringing capacitance of a semi-infinite thin plate Cf = (2ε/π)·ln 2.
    expect(striplineFringing(0)).toBeCloseTo(0.441, 3);
    expect(striplineFringing(1e-9)).toBeCloseTo((2 * Math.LN2) / Math.PI, 6);
    // Thicker strips fringe more.
    expect(striplineFringing(0.1)).toBeGreaterThan(striplineFringing(0.01));
  });

  it('joins the narrow- and wide-strip forms within 1.5 % where one takes over (W/(b−t) = 0.35)', () => {
    // Cohn 1955 gives each form as accurate to about 1 % at its edge (from memory); the two must meet there.
    // t/b up to 0.035 keeps the narrow strip within its t/W ≤ 0.11.
    for (const t of [0.001, 0.01, 0.02, 0.035]) {
      const b = 1;
      const narrow = stripline({ width: 0.3499 * (b - t), groundSpacing: b, thickness: t, epsilonR: 1 });
      const wide = stripline({ width: 0.3501 * (b - t), groundSpacing: b, thickness: t, epsilonR: 1 });
      expect(narrow.formula).toBe(STRIPLINE_FORMULAS.thickNarrow);
      expect(wide.formula).toBe(STRIPLINE_FORMULAS.thickWide);
      expect(rel(narrow.z0Ohm, wide.z0Ohm)).toBeLessThan(0.015);
    }
  });

  it('refuses inputs outside the formulas’ range, saying why', () => {
    expect(() => stripline({ width: 1 * MM, groundSpacing: 1.6 * MM, thickness: 0.5 * MM, epsilonR: 4.3 })).toThrow(
      /t\/b is 0\.313.*below 0\.25/,
    );
    expect(() => stripline({ width: 0.2 * MM, groundSpacing: 1.6 * MM, thickness: 0.035 * MM, epsilonR: 4.3 })).toThrow(
      /t\/W is 0\.175.*up to 0\.11/,
    );
    expect(() => stripline({ width: 0.001 * MM, groundSpacing: 1.6 * MM, epsilonR: 4.3 })).toThrow(/W\/b/);
    expect(() => stripline({ width: 1 * MM, groundSpacing: 1.6 * MM, epsilonR: 0.9 })).toThrow(DerivationError);
    try {
      stripline({ width: 1 * MM, groundSpacing: 1.6 * MM, thickness: -0.1, epsilonR: 4.3 });
    } catch (e) {
      expect((e as DerivationError).field).toBe('thickness');
    }
  });
});

describe('the geometry cancels on a uniformly filled line: L·C·c² = εr·μr', () => {
  const fillings = [
    { er: 1, mr: 1 },
    { er: 2.2, mr: 1 },
    { er: 2.26, mr: 1 },
    { er: 4.3, mr: 1 },
    { er: 2.5, mr: 1.8 },
  ];
  const check = (lc: number, er: number, mr: number) => expect(rel(lc * c * c, er * mr)).toBeLessThan(1e-12);

  it('for two-wire lines, whatever s/d', () => {
    for (const ratio of [1.05, 1.5, 3, 10, 100, 1000])
      for (const { er, mr } of fillings)
        check(twoWire({ wireDiameter: 1 * MM, spacing: ratio * MM, epsilonR: er, muR: mr }).lc, er, mr);
  });

  it('for coax, whatever D/d', () => {
    for (const ratio of [1.1, 2.3, 3.6, 10, 300])
      for (const { er, mr } of fillings)
        check(coax({ innerDiameter: 1 * MM, outerDiameter: ratio * MM, epsilonR: er, muR: mr }).lc, er, mr);
  });

  it('for stripline, thin or thick, narrow or wide', () => {
    for (const wb of [0.02, 0.1, 0.3, 0.35, 0.8, 2, 20])
      for (const tb of [0, 0.001, 0.02, 0.1])
        for (const { er, mr } of fillings) {
          if (tb > 0 && wb / (1 - tb) < 0.35 && tb / wb > 0.11) continue; // outside the narrow-strip form, refused
          const line = stripline({ width: wb * MM, groundSpacing: 1 * MM, thickness: tb * MM, epsilonR: er, muR: mr });
          check(line.lc, er, mr);
          expect(line.vf).toBeCloseTo(1 / Math.sqrt(er * mr), 12);
        }
  });

  it('for shielded pairs and touching-insulation pairs too', () => {
    for (const { er, mr } of fillings) {
      check(shieldedPair({ wireDiameter: 1 * MM, spacing: 4 * MM, shieldDiameter: 12 * MM, epsilonR: er, muR: mr }).lc, er, mr);
      check(
        twistedPair({ method: 'touching', wireDiameter: 0.5 * MM, centreSpacing: 0.9 * MM, insulationEpsilonR: er, muR: mr }).lc,
        er,
        mr,
      );
    }
  });
});

describe('twisted pair', () => {
  it('gives about 100 Ω for a data pair of No. 24 wire in solid polyethylene', () => {
    // No. 24 AWG = 0.511 mm (ASTM B258). Insulated diameter 0.94 mm: typical of category data cable (from memory).
    // Solid PE εr 2.26 (Standard Wire & Cable, "Formula for capacitance…", table III).
    // Pair impedance 100 Ω ± 15 % (ANSI/TIA-568 balanced twisted-pair cabling); NVP of solid-PE data pairs about
    // 0.65–0.70 (common practice).
    const pair = twistedPair({
      method: 'touching',
      wireDiameter: awgDiameterM(24),
      centreSpacing: 0.94 * MM,
      insulationEpsilonR: 2.26,
    });
    expect(pair.z0Ohm).toBeGreaterThan(85);
    expect(pair.z0Ohm).toBeLessThan(115);
    expect(pair.vf).toBeGreaterThan(0.65);
    expect(pair.vf).toBeLessThan(0.7);
    // Worked by hand from the formula: acosh(0.94/0.51056) = 1.21994, η0/π = 119.917 Ω, √2.26 = 1.50333 → 97.31 Ω.
    expect(pair.z0Ohm).toBeCloseTo(97.31, 1);
  });

  it('applies Lefferson’s twist-angle correction: q = 0.25 + 0.0004·θ², θ in degrees', () => {
    // Lefferson 1971 (restated in Wadell, Transmission Line Design Handbook, pp. 68–69): θ = atan(T·π·D), T twists per length.
    const D = 0.45 * MM;
    const lay = (Math.PI * D) / Math.tan((30 * Math.PI) / 180); // a lay that gives exactly 30°
    expect(twistAngleDeg(D, lay)).toBeCloseTo(30, 10);
    const pair = twistedPair({
      method: 'twist',
      wireDiameter: 0.4 * MM,
      centreSpacing: D,
      insulationEpsilonR: 3.5,
      layLength: lay,
    });
    // q = 0.25 + 0.0004·900 = 0.61; εeff = 1 + 0.61·2.5 = 2.525; Z0 = 119.917/√2.525 · acosh(1.125) = 119.917/1.58902 · 0.49493 = 37.35 Ω.
    expect(pair.q).toBeCloseTo(0.61, 12);
    expect(pair.epsilonEff).toBeCloseTo(2.525, 12);
    expect(pair.z0Ohm).toBeCloseTo(37.35, 1);
    expect(pair.vf).toBeCloseTo(1 / Math.sqrt(2.525), 12);
    // A tighter twist puts more of the field in the film: lower Z0, slower.
    const tighter = twistedPair({
      method: 'twist',
      wireDiameter: 0.4 * MM,
      centreSpacing: D,
      insulationEpsilonR: 3.5,
      layLength: lay * 0.7,
    });
    expect(tighter.z0Ohm).toBeLessThan(pair.z0Ohm);
    expect(tighter.vf).toBeLessThan(pair.vf);
  });

  it('refuses a twist outside Lefferson’s 20°–45°, and past the angle where q would exceed 1', () => {
    const base = { method: 'twist' as const, wireDiameter: 0.4 * MM, centreSpacing: 0.45 * MM, insulationEpsilonR: 3.5 };
    const layFor = (deg: number) => (Math.PI * base.centreSpacing) / Math.tan((deg * Math.PI) / 180);
    expect(() => twistedPair({ ...base, layLength: layFor(12) })).toThrow(/12°.*20° to 45°.*looser/);
    expect(() => twistedPair({ ...base, layLength: layFor(50) })).toThrow(/tighter/);
    // q = 1 at θ = √(0.75/0.0004) = 43.3° for film, √(0.75/0.001) = 27.4° for PTFE film.
    expect(() => twistedPair({ ...base, layLength: layFor(44) })).toThrow(/43\.3°/);
    expect(twistedPair({ ...base, layLength: layFor(43) }).q).toBeLessThan(1);
    expect(() => twistedPair({ ...base, film: 'ptfe', layLength: layFor(30) })).toThrow(/27\.4°/);
    expect(() => twistedPair({ ...base, layLength: undefined })).toThrow(/lay length/);
    expect(() => twistedPair({ ...base, centreSpacing: 0.3 * MM, layLength: 5 * MM })).toThrow(/centre spacing D must be larger/);
  });
});

describe('shielded pair', () => {
  it('becomes the thin-wire two-wire line when the screen is far away', () => {
    // Reference Data for Radio Engineers, balanced shielded line: σ → 0 leaves 276·log10(2h/d)/√εr (ARRL Handbook's two-wire form).
    const far = shieldedPair({ wireDiameter: 1 * MM, spacing: 10 * MM, shieldDiameter: 10_000 * MM, epsilonR: 1 });
    expect(rel(far.z0Ohm, 276 * Math.log10(20))).toBeLessThan(0.002);
    expect(rel(far.z0Ohm, far.unshieldedZ0Ohm)).toBeLessThan(1e-5);
  });

  it('matches the image-charge solution of two thin wires in a grounded round screen', () => {
    // Each line charge λ at distance a from the axis inside a grounded cylinder of radius R has its image −λ at R²/a
    // (textbook image construction, e.g. Smythe, Static and Dynamic Electricity, §4.12). Averaging the potential over
    // the wire's surface gives C = λ/(V+ − V−) independently of the closed form.
    for (const [d, h, D] of [
      [1, 4, 10],
      [1, 3, 8],
      [0.5, 3, 20],
    ]) {
      const a = h / 2;
      const R = D / 2;
      const r = d / 2;
      const charges: Array<[number, number]> = [
        [a, 1],
        [(R * R) / a, -1],
        [-a, -1],
        [-(R * R) / a, 1],
      ];
      let sum = 0;
      const n = 720;
      for (let i = 0; i < n; i++) {
        const phi = (2 * Math.PI * i) / n;
        const x = a + r * Math.cos(phi);
        const y = r * Math.sin(phi);
        for (const [xq, q] of charges) sum += -q * Math.log(Math.hypot(x - xq, y));
      }
      const vPlusTimes2PiEps = sum / n; // V+ · 2π·ε0 / λ
      const cFPerM = (2 * Math.PI * EPSILON_0) / (2 * vPlusTimes2PiEps); // V− = −V+
      const z0 = 1 / (c * cFPerM);
      const line = shieldedPair({ wireDiameter: d * MM, spacing: h * MM, shieldDiameter: D * MM, epsilonR: 1 });
      expect(rel(line.z0Ohm, z0)).toBeLessThan(0.01);
    }
  });

  it('is lower than the same pair unshielded, and refuses wires too thick for the formula', () => {
    const line = shieldedPair({ wireDiameter: 1 * MM, spacing: 4 * MM, shieldDiameter: 10 * MM, epsilonR: 2.26 });
    expect(line.z0Ohm).toBeLessThan(line.unshieldedZ0Ohm);
    expect(line.vf).toBeCloseTo(1 / Math.sqrt(2.26), 12);
    expect(() => shieldedPair({ wireDiameter: 1 * MM, spacing: 2 * MM, shieldDiameter: 10 * MM, epsilonR: 2.26 })).toThrow(
      /h\/d is 2.*at least 3/,
    );
    expect(() => shieldedPair({ wireDiameter: 1 * MM, spacing: 4 * MM, shieldDiameter: 6 * MM, epsilonR: 2.26 })).toThrow(
      /too close to the screen/,
    );
    expect(() => shieldedPair({ wireDiameter: 1 * MM, spacing: 4 * MM, shieldDiameter: 4.5 * MM, epsilonR: 2.26 })).toThrow(
      /do not fit/,
    );
  });
});

describe('two dielectrics', () => {
  it('gives 300 Ω twin lead a VF of about 0.8–0.86 from its partly-air field', () => {
    // 300 Ω twin lead: No. 20 or No. 22 wires about 7.5 mm apart in a polyethylene ribbon (Wikipedia, "Twin-lead").
    // Web εr 2.26 (Standard Wire & Cable, table III). Handbook VF of 300 Ω twin lead: 0.80–0.82 (ARRL Antenna Book,
    // feed-line table, and Reference Data for Radio Engineers; both from memory).
    for (const gauge of [20, 22]) {
      const geometry = { kind: 'two-wire' as const, wireDiameter: awgDiameterM(gauge), spacing: 7.5 * MM };
      const air = twoWire({ wireDiameter: geometry.wireDiameter, spacing: geometry.spacing, epsilonR: 1 }).z0Ohm;
      // The web's share q that brings this line to 300 Ω, from εeff = (Z0,air/300)².
      const q = ((air / 300) ** 2 - 1) / (2.26 - 1);
      expect(q).toBeGreaterThan(0.15); // a real share of the field is in the web…
      expect(q).toBeLessThan(0.6); // …but most of it is in the air
      const line = twoDielectricLine({ geometry, epsilon1: 1, epsilon2: 2.26, fraction: q, rule: 'parallel' });
      expect(line.z0Ohm).toBeCloseTo(300, 9);
      expect(line.vf).toBeGreaterThan(0.78);
      expect(line.vf).toBeLessThan(0.87);
      // The dielectric changes C, not L: L is the bare wires' in air.
      expect(rel(line.lHPerM, twoWire({ ...geometry, epsilonR: 1 }).lHPerM)).toBeLessThan(1e-12);
      expect(rel(line.lc * c * c, line.epsilonEff)).toBeLessThan(1e-12);
    }
  });

  it('is exact for concentric layers in coax (series rule) and for wedge-shaped sectors (parallel rule)', () => {
    // Two-layer coaxial capacitor: C = 2πε0 / (ln(D1/d)/ε1 + ln(D/D1)/ε2); two sectors filling angles of the gap:
    // C = 2πε0·((1 − q)·ε1 + q·ε2)/ln(D/d) (capacitors in series and in parallel; Ramo, Whinnery & Van Duzer, ch. 1).
    const d = 1;
    const D1 = 2;
    const D = 4.5;
    const [e1, e2] = [1, 2.26];
    const layered = (2 * Math.PI * EPSILON_0) / (Math.log(D1 / d) / e2 + Math.log(D / D1) / e1);
    const q = Math.log(D1 / d) / Math.log(D / d);
    const series = twoDielectricLine({
      geometry: { kind: 'coax', outerDiameter: D, innerDiameter: d },
      epsilon1: e1,
      epsilon2: e2,
      fraction: q,
      rule: 'series',
    });
    expect(rel(series.cFPerM, layered)).toBeLessThan(1e-12);
    const sectors = (2 * Math.PI * EPSILON_0 * ((1 - 0.3) * e1 + 0.3 * e2)) / Math.log(D / d);
    const parallel = twoDielectricLine({
      geometry: { kind: 'coax', outerDiameter: D, innerDiameter: d },
      epsilon1: e1,
      epsilon2: e2,
      fraction: 0.3,
      rule: 'parallel',
    });
    expect(rel(parallel.cFPerM, sectors)).toBeLessThan(1e-12);
  });

  it('puts a foam between Wiener’s bounds with Looyenga’s rule', () => {
    // Looyenga, Physica 31 (1965) 401: εeff^(1/3) = Σ vi·εi^(1/3). Half PE, half gas: ((1 + 2.26^(1/3))/2)³ = 1.5454.
    const m = mixPermittivity(1, 2.26, 0.5, 'foam');
    expect(m.epsilonEff).toBeCloseTo(1.5454, 4);
    expect(m.epsilonEff).toBeGreaterThan(m.lowest);
    expect(m.epsilonEff).toBeLessThan(m.highest);
    // Cellular PE is listed at εr 1.56 (Standard Wire & Cable, table III), a foam of about half polymer by this rule.
    expect(rel(m.epsilonEff, 1.56)).toBeLessThan(0.02);
    // The ends: all gas, all polymer.
    expect(mixPermittivity(1, 2.26, 0, 'foam').epsilonEff).toBeCloseTo(1, 12);
    expect(mixPermittivity(1, 2.26, 1, 'series').epsilonEff).toBeCloseTo(2.26, 12);
    expect(() => mixPermittivity(1, 2.26, 1.2, 'parallel')).toThrow(/filling fraction q/);
  });
});

describe('the derivation carried into the library', () => {
  it('names the formula, the inputs, the result and the source', () => {
    const line = stripline({ width: 2.66 * MM, groundSpacing: 3.2 * MM, epsilonR: 2.2 });
    const text = derivationReference(line.formula, ['W = 2.66 mm', 'b = 3.2 mm', 'εr = 2.2'], line);
    expect(text).toContain('Cohn’s exact thin-strip stripline formula');
    expect(text).toContain('W = 2.66 mm, b = 3.2 mm, εr = 2.2');
    expect(text).toContain(`VF = ${Number(line.vf.toPrecision(4))}`);
    expect(text).toContain('Source: S. B. Cohn');
    expect(text.length).toBeLessThan(2000); // the library's reference field holds 2000 characters
  });
});
