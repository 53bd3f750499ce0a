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
import { M_PER_FT, SPEED_OF_LIGHT_M_PER_S } from './propagation';

/** Vacuum permeability, H/m (CODATA 2018 recommended value; no longer exact since the 2019 SI). */
export const MU_0 = 1.25663706212e-6;
/** Vacuum permittivity, F/m, from ε0 = 1/(μ0·c²) so that the two constants agree with c exactly. CODATA 2018: 8.8541878128e-12. */
export const EPSILON_0 = 1 / (MU_0 * SPEED_OF_LIGHT_M_PER_S ** 2);
/** Impedance of free space η0 = μ0·c ≈ 376.73 Ω. */
export const ETA_0 = MU_0 * SPEED_OF_LIGHT_M_PER_S;

/** A derivation's input is out of range; `field` names the input so a form can point at it. */
export class DerivationError extends RangeError {
  constructor(
    public field: string,
    message: string,
  ) {
    super(message);
  }
}

function positive(field: string, value: number, what: string) {
  if (!Number.isFinite(value) || value <= 0) throw new DerivationError(field, `${what} must be a number greater than 0.`);
}
function atLeastOne(field: string, value: number, what: string) {
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
  if (!Number.isFinite(vf) || vf <= 0 || vf > 1) throw new DerivationError('vf', 'The velocity factor must be greater than 0 and at most 1.');
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

// ---- geometries ----

export interface LineGeometryResult {
  z0Ohm: number;
  lHPerM: number;
  cFPerM: number;
  vf: number;
  /** L·C, s²/m², to set beside μ·ε. */
  lc: number;
  /** μ·ε = μ0μr·ε0εr, s²/m². */
  muEpsilon: number;
  delayNsPerM: number;
}

function finish(lHPerM: number, cFPerM: number, epsilonR: number, muR: number): LineGeometryResult {
  const lc = lHPerM * cFPerM;
  const vf = 1 / (Math.sqrt(lc) * SPEED_OF_LIGHT_M_PER_S);
  return {
    z0Ohm: Math.sqrt(lHPerM / cFPerM),
    lHPerM,
    cFPerM,
    vf,
    lc,
    muEpsilon: MU_0 * muR * EPSILON_0 * epsilonR,
    delayNsPerM: delayNsPerM(vf),
  };
}

/**
 * Coaxial line: inner conductor diameter d, dielectric (inside of the screen)
 * diameter D, both in the same unit. L = (μ/2π)·ln(D/d), C = 2πε/ln(D/d),
 * Z0 = √(L/C) = (η0/2π)/√εr·ln(D/d) ≈ (60/√εr)·ln(D/d).
 */
export function coax(input: { outerDiameter: number; innerDiameter: number; epsilonR: number; muR?: number }): LineGeometryResult {
  const { outerDiameter: D, innerDiameter: d, epsilonR, muR = 1 } = input;
  positive('innerDiameter', d, 'The inner conductor diameter d');
  positive('outerDiameter', D, 'The dielectric diameter D');
  if (D <= d) throw new DerivationError('outerDiameter', 'The dielectric diameter D must be larger than the inner conductor diameter d.');
  atLeastOne('epsilonR', epsilonR, 'The relative permittivity εr');
  atLeastOne('muR', muR, 'The relative permeability μr');
  const k = Math.log(D / d);
  const mu = MU_0 * muR;
  const eps = EPSILON_0 * epsilonR;
  return finish((mu / (2 * Math.PI)) * k, (2 * Math.PI * eps) / k, epsilonR, muR);
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
  if (s <= d) throw new DerivationError('spacing', 'The centre spacing s must be larger than the wire diameter d (the wires would touch).');
  atLeastOne('epsilonR', epsilonR, 'The relative permittivity εr');
  atLeastOne('muR', muR, 'The relative permeability μr');
  const mu = MU_0 * muR;
  const eps = EPSILON_0 * epsilonR;
  const exactK = Math.acosh(s / d);
  const thinK = Math.log((2 * s) / d);
  const exact = finish((mu / Math.PI) * exactK, (Math.PI * eps) / exactK, epsilonR, muR);
  const thinWire = finish((mu / Math.PI) * thinK, (Math.PI * eps) / thinK, epsilonR, muR);
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
  if (!Number.isInteger(gauge) || gauge < -3 || gauge > 40) throw new DerivationError('gauge', 'The wire gauge must be a whole number from −3 (0000) to 40.');
  return 0.127e-3 * 92 ** ((36 - gauge) / 39);
}
