/**
 * Velocity factor and impedance from what a planner can find for a cable:
 * the dielectric's permittivity, the line's inductance and capacitance per
 * unit length, or its geometry (coax, two-wire). Everything in SI.
 *
 * For any lossless TEM line in a uniform dielectric, L·C = μ·ε whatever the
 * geometry (Pozar, "Microwave Engineering", 4th ed., §2.1 and Table 2.1;
 * Ramo, Whinnery & Van Duzer, "Fields and Waves in Communication
 * Electronics", ch. 5). The geometry sets Z0 = √(L/C); the velocity
 * u = 1/√(LC) = 1/√(με) depends on the dielectric alone.
 */
import { EPSILON_0, ETA_0, M_PER_FT, MU_0, SPEED_OF_LIGHT_M_PER_S } from './propagation';

export { EPSILON_0, ETA_0, MU_0 };

/** A derivation's input is out of range; `field` names the input so a form can point at it. */
export class DerivationError extends RangeError {
  constructor(
    public field: string,
    message: string,
  ) {
    super(message);
  }
}

export function positive(field: string, value: number, what: string) {
  if (!Number.isFinite(value) || value <= 0) throw new DerivationError(field, `${what} must be a number greater than 0.`);
}
export function atLeastOne(field: string, value: number, what: string) {
  if (!Number.isFinite(value) || value < 1) throw new DerivationError(field, `${what} must be at least 1 (vacuum is 1).`);
}

// ---- velocity factor ----

/** VF = 1/√(εr·μr). */
export function vfFromPermittivity(epsilonR: number, muR = 1): number {
  atLeastOne('epsilonR', epsilonR, 'The relative permittivity εr');
  atLeastOne('muR', muR, 'The relative permeability μr');
  return 1 / Math.sqrt(epsilonR * muR);
}

/** The (effective) relative permittivity a VF implies, for a non-magnetic dielectric: εr = 1/VF². */
export function permittivityFromVf(vf: number): number {
  if (!Number.isFinite(vf) || vf <= 0 || vf > 1)
    throw new DerivationError('vf', 'The velocity factor must be greater than 0 and at most 1.');
  return 1 / (vf * vf);
}

export interface LineFromLC {
  /** Phase velocity u = 1/√(LC), m/s. */
  velocityMPerS: number;
  /** VF = u/c. */
  vf: number;
  /** Z0 = √(L/C), Ω. */
  z0Ohm: number;
  /** The dielectric a VF above implies: εr·μr = 1/VF². */
  epsilonMuR: number;
}

/** From inductance (H/m) and capacitance (F/m) per unit length. */
export function lineFromLC(lHPerM: number, cFPerM: number): LineFromLC {
  positive('lHPerM', lHPerM, 'The inductance per metre');
  positive('cFPerM', cFPerM, 'The capacitance per metre');
  const velocityMPerS = 1 / Math.sqrt(lHPerM * cFPerM);
  const vf = velocityMPerS / SPEED_OF_LIGHT_M_PER_S;
  return { velocityMPerS, vf, z0Ohm: Math.sqrt(lHPerM / cFPerM), epsilonMuR: 1 / (vf * vf) };
}

/** VF alone from L (H/m) and C (F/m). */
export function vfFromLC(lHPerM: number, cFPerM: number): number {
  return lineFromLC(lHPerM, cFPerM).vf;
}

// ---- is the result a velocity a cable can have? ----

/**
 * The velocity factors cables are usually found at (common practice): from
 * about 0.4 (thick PVC insulation, εr ≈ 5–6) to 0.99 (open-wire line with a
 * few spacers). Nothing is faster than light, so nothing is above 1.
 */
export const USUAL_VF_RANGE = { min: 0.4, max: 0.99 } as const;

export type VfVerdict = { level: 'ok' } | { level: 'warn' | 'refuse'; message: string };

/**
 * Every derived VF passes through here before it is shown or offered to the
 * library: above 1 (faster than light) it is refused; outside the usual
 * range it is shown with a warning that says what to check.
 */
export function assessVf(vf: number): VfVerdict {
  if (!Number.isFinite(vf) || vf <= 0)
    return { level: 'refuse', message: 'No velocity factor can be worked out from these values.' };
  const shown = Number(vf.toPrecision(4));
  if (vf > 1 + 1e-12)
    return {
      level: 'refuse',
      message: `VF ${shown} would be faster than light, which no cable can be. Check the values and their units (nH and µH, pF and nF, per metre or per foot).`,
    };
  if (vf > USUAL_VF_RANGE.max)
    return {
      level: 'warn',
      message: `VF ${shown} is the speed of light in vacuum or air with nothing else in the field. Real lines have insulation or spacers and come out slower (open-wire line about 0.95–0.99); check εr.`,
    };
  if (vf < USUAL_VF_RANGE.min)
    return {
      level: 'warn',
      message: `VF ${shown} is slower than cables usually are (${USUAL_VF_RANGE.min}–${USUAL_VF_RANGE.max}). Check εr and the units before using it.`,
    };
  return { level: 'ok' };
}

// ---- where a derivation comes from ----

/** A published closed form: what it is, where it is published, and the inputs it holds for. */
export interface FormulaSource {
  /** Short name, shown on the card and carried into the library entry. */
  name: string;
  /** The formula in one line. */
  formula: string;
  /** Where it is published. */
  source: string;
  /** The range of inputs it is published (or accepted here) for. */
  validity: string;
}

/**
 * One line of text for a library entry's VF reference: which formula, from
 * which inputs, what it gave and where the formula is published.
 */
export function derivationReference(formula: FormulaSource, inputs: string[], result: { vf: number; z0Ohm?: number }): string {
  const gave = [
    `VF = ${Number(result.vf.toPrecision(4))}`,
    ...(result.z0Ohm !== undefined ? [`Z0 = ${Number(result.z0Ohm.toPrecision(4))} Ω`] : []),
  ].join(', ');
  return `Calculated with ${formula.name} (${formula.formula}) from ${inputs.join(', ')}: ${gave}. Source: ${formula.source}. Holds for ${formula.validity}.`;
}

// ---- geometries ----

/** The calculator's first four derivations, named for the library entry they start. */
export const BASIC_FORMULAS = {
  permittivity: {
    name: 'the uniform-dielectric velocity factor',
    formula: 'VF = 1/√(εr·μr)',
    source: 'D. M. Pozar, Microwave Engineering, 4th ed. (Wiley, 2012), §2.1 (u = 1/√(με) on any TEM line in one dielectric)',
    validity: 'a line whose whole field is in the one dielectric, εr and μr at least 1',
  },
  lc: {
    name: 'the line constants L and C',
    formula: 'u = 1/√(LC), VF = u/c, Z0 = √(L/C)',
    source: 'D. M. Pozar, Microwave Engineering, 4th ed. (Wiley, 2012), §2.1 (lossless line)',
    validity: 'a lossless or low-loss line, L and C per unit length at the frequencies of the pulse',
  },
  coax: {
    name: 'the coaxial-line formulas',
    formula: 'L = (μ/2π)·ln(D/d), C = 2πε/ln(D/d), Z0 = (η0/2π)·√(μr/εr)·ln(D/d)',
    source: 'D. M. Pozar, Microwave Engineering, 4th ed. (Wiley, 2012), Table 2.1',
    validity: 'a round, concentric coax with one dielectric filling the space, D larger than d',
  },
  twoWire: {
    name: 'the two-wire-line formulas',
    formula: 'L = (μ/π)·acosh(s/d), C = πε/acosh(s/d), Z0 = (η0/π)·√(μr/εr)·acosh(s/d)',
    source: 'D. M. Pozar, Microwave Engineering, 4th ed. (Wiley, 2012), Table 2.1',
    validity: 'two parallel round wires in one (or an effective) dielectric, s larger than d',
  },
} satisfies Record<string, FormulaSource>;

export interface LineGeometryResult {
  z0Ohm: number;
  lHPerM: number;
  cFPerM: number;
  /** Phase velocity u = 1/√(LC), m/s. */
  velocityMPerS: number;
  vf: number;
  /** L·C, s²/m², to set beside μ·ε. */
  lc: number;
  /** μ·ε = μ0μr·ε0εr (εr the effective one on a partly filled line), s²/m². */
  muEpsilon: number;
  delayNsPerM: number;
}

/** The line's figures from its L and C per metre; εr and μr give μ·ε to set beside L·C. */
export function lineResult(lHPerM: number, cFPerM: number, epsilonR: number, muR: number): LineGeometryResult {
  const lc = lHPerM * cFPerM;
  const velocityMPerS = 1 / Math.sqrt(lc);
  const vf = velocityMPerS / SPEED_OF_LIGHT_M_PER_S;
  return {
    z0Ohm: Math.sqrt(lHPerM / cFPerM),
    lHPerM,
    cFPerM,
    velocityMPerS,
    vf,
    lc,
    muEpsilon: MU_0 * muR * EPSILON_0 * epsilonR,
    delayNsPerM: delayNsPerM(vf),
  };
}

/**
 * A line whose geometry is known through its impedance in vacuum, Z0,air:
 * there L0·C0 = 1/c², so L0 = Z0,air/c and C0 = 1/(c·Z0,air). Filling it
 * with εr (or an effective εr) and μr scales C by εr and L by μr, so
 * Z0 = Z0,air·√(μr/εr) and u = c/√(εr·μr) whatever the geometry.
 */
export function lineFromAirImpedance(z0AirOhm: number, epsilonR: number, muR = 1): LineGeometryResult {
  positive('z0AirOhm', z0AirOhm, 'The impedance in air');
  atLeastOne('epsilonR', epsilonR, 'The relative permittivity εr');
  atLeastOne('muR', muR, 'The relative permeability μr');
  return lineResult((muR * z0AirOhm) / SPEED_OF_LIGHT_M_PER_S, epsilonR / (SPEED_OF_LIGHT_M_PER_S * z0AirOhm), epsilonR, muR);
}

/**
 * Coaxial line: inner conductor diameter d, dielectric (inside of the screen)
 * diameter D, both in the same unit. L = (μ/2π)·ln(D/d), C = 2πε/ln(D/d),
 * Z0 = √(L/C) = (η0/2π)/√εr·ln(D/d) ≈ (60/√εr)·ln(D/d).
 */
export function coax(input: {
  outerDiameter: number;
  innerDiameter: number;
  epsilonR: number;
  muR?: number;
}): LineGeometryResult {
  const { outerDiameter: D, innerDiameter: d, epsilonR, muR = 1 } = input;
  positive('innerDiameter', d, 'The inner conductor diameter d');
  positive('outerDiameter', D, 'The dielectric diameter D');
  if (D <= d)
    throw new DerivationError('outerDiameter', 'The dielectric diameter D must be larger than the inner conductor diameter d.');
  atLeastOne('epsilonR', epsilonR, 'The relative permittivity εr');
  atLeastOne('muR', muR, 'The relative permeability μr');
  const k = Math.log(D / d);
  const mu = MU_0 * muR;
  const eps = EPSILON_0 * epsilonR;
  return lineResult((mu / (2 * Math.PI)) * k, (2 * Math.PI * eps) / k, epsilonR, muR);
}

export interface TwoWireResult extends LineGeometryResult {
  /** The same line by the thin-wire formulas (s ≫ d): L = (μ/π)·ln(2s/d), C = πε/ln(2s/d). */
  thinWire: LineGeometryResult;
  /** (thin-wire Z0 − exact Z0) / exact Z0: how far the thin-wire limit is off at this spacing. */
  thinWireError: number;
}

/**
 * Two parallel round wires of diameter d at centre spacing s in a uniform
 * dielectric: L = (μ/π)·acosh(s/d), C = πε/acosh(s/d),
 * Z0 = (η0/π)/√εr·acosh(s/d) ≈ (120/√εr)·acosh(s/d).
 * For s ≫ d, acosh(s/d) → ln(2s/d), the handbook's 276·log10(2s/d) for air.
 * Real twin lead has its field partly in air and partly in the web, so use
 * an effective εr (from a measured VF: εr = 1/VF²).
 */
export function twoWire(input: { wireDiameter: number; spacing: number; epsilonR: number; muR?: number }): TwoWireResult {
  const { wireDiameter: d, spacing: s, epsilonR, muR = 1 } = input;
  positive('wireDiameter', d, 'The wire diameter d');
  positive('spacing', s, 'The centre spacing s');
  if (s <= d)
    throw new DerivationError('spacing', 'The centre spacing s must be larger than the wire diameter d (the wires would touch).');
  atLeastOne('epsilonR', epsilonR, 'The relative permittivity εr');
  atLeastOne('muR', muR, 'The relative permeability μr');
  const mu = MU_0 * muR;
  const eps = EPSILON_0 * epsilonR;
  const exactK = Math.acosh(s / d);
  const thinK = Math.log((2 * s) / d);
  const exact = lineResult((mu / Math.PI) * exactK, (Math.PI * eps) / exactK, epsilonR, muR);
  const thinWire = lineResult((mu / Math.PI) * thinK, (Math.PI * eps) / thinK, epsilonR, muR);
  return { ...exact, thinWire, thinWireError: (thinWire.z0Ohm - exact.z0Ohm) / exact.z0Ohm };
}

// ---- delay and units ----

/** One-way propagation delay, ns per metre, at velocity factor vf. */
export function delayNsPerM(vf: number): number {
  if (!Number.isFinite(vf) || vf <= 0) throw new DerivationError('vf', 'The velocity factor must be greater than 0.');
  return 1e9 / (vf * SPEED_OF_LIGHT_M_PER_S);
}

/** One-way propagation delay, ns per foot. */
export function delayNsPerFt(vf: number): number {
  return delayNsPerM(vf) * M_PER_FT;
}

export function mToFt(m: number): number {
  return m / M_PER_FT;
}
export function ftToM(ft: number): number {
  return ft * M_PER_FT;
}

/**
 * Diameter in metres of a solid round wire of American Wire Gauge n
 * (0000 is n = −3): d = 0.127 mm · 92^((36 − n)/39) (ASTM B258).
 */
export function awgDiameterM(gauge: number): number {
  if (!Number.isInteger(gauge) || gauge < -3 || gauge > 40)
    throw new DerivationError('gauge', 'The wire gauge must be a whole number from −3 (0000) to 40.');
  return 0.127e-3 * 92 ** ((36 - gauge) / 39);
}
