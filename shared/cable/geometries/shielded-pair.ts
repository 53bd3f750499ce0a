/**
 * Shielded pair (balanced line in a screen): two round wires of diameter d,
 * centres h apart, placed symmetrically inside a round screen of inner
 * diameter D, in a uniform dielectric, driven balanced (one wire against the
 * other, the screen between them in potential).
 *
 * Z0 = (η0/π)·√(μr/εr)·ln[2v·(1 − σ²)/(1 + σ²)], v = h/d, σ = h/D
 * (276/√εr·log10 of the same, in the handbook's form). With the screen far
 * away (σ → 0) it becomes the thin-wire two-wire line, (η0/π)·ln(2h/d).
 * The formula treats the wires as thin lines of charge, so it needs d small
 * beside both h and the room left to the screen.
 */
import {
  atLeastOne,
  DerivationError,
  EPSILON_0,
  MU_0,
  lineResult,
  positive,
  type FormulaSource,
  type LineGeometryResult,
} from '../derivations';

export const SHIELDED_PAIR_FORMULA = {
  name: 'the balanced shielded-line formula',
  formula: 'Z0 = (η0/π)·√(μr/εr)·ln[2v·(1−σ²)/(1+σ²)], v = h/d, σ = h/D (the handbook’s 276/√εr·log10 form)',
  source:
    'Reference Data for Radio Engineers, 6th ed. (Howard W. Sams, 1975), transmission-line chapter, balanced shielded line (quoted from memory)',
  validity:
    'thin wires: the handbook asks for d ≪ h and d ≪ D; accepted here for h at least 3·d (where the thin-wire term is within 2 % of the exact two-wire one) and at least 1.5·d from each wire’s centre to the screen',
} satisfies FormulaSource;

/** h/d below this is refused: ln(2v) differs from the exact acosh(v) by more than 2 % there. */
export const SHIELDED_PAIR_MIN_H_OVER_D = 3;
/** Each wire's centre must be at least this many wire diameters from the screen. */
export const SHIELDED_PAIR_MIN_WALL_OVER_D = 1.5;

export interface ShieldedPairInput {
  /** Wire diameter d, m. */
  wireDiameter: number;
  /** Centre-to-centre spacing of the two wires h, m. */
  spacing: number;
  /** Inner diameter of the screen D, m. */
  shieldDiameter: number;
  epsilonR: number;
  muR?: number;
}

export interface ShieldedPairResult extends LineGeometryResult {
  formula: FormulaSource;
  /** The same wires without the screen (thin-wire two-wire line), for comparison. */
  unshieldedZ0Ohm: number;
}

export function shieldedPair(input: ShieldedPairInput): ShieldedPairResult {
  const { wireDiameter: d, spacing: h, shieldDiameter: D, epsilonR, muR = 1 } = input;
  positive('wireDiameter', d, 'The wire diameter d');
  positive('spacing', h, 'The wire spacing h');
  positive('shieldDiameter', D, 'The screen’s inner diameter D');
  atLeastOne('epsilonR', epsilonR, 'The relative permittivity εr');
  atLeastOne('muR', muR, 'The relative permeability μr');
  if (h <= d)
    throw new DerivationError('spacing', 'The wire spacing h must be larger than the wire diameter d (the wires would touch).');
  if (h + d >= D)
    throw new DerivationError('shieldDiameter', 'The wires do not fit inside the screen: D must be larger than h + d.');
  if (h / d < SHIELDED_PAIR_MIN_H_OVER_D)
    throw new DerivationError(
      'spacing',
      `h/d is ${Number((h / d).toPrecision(3))}: the shielded-pair formula treats the wires as thin, and is used here only for h at least ${SHIELDED_PAIR_MIN_H_OVER_D}·d. For touching insulated wires use the twisted-pair card.`,
    );
  const wall = (D - h) / 2;
  if (wall / d < SHIELDED_PAIR_MIN_WALL_OVER_D)
    throw new DerivationError(
      'shieldDiameter',
      `The wires sit too close to the screen (their centres ${Number((wall / d).toPrecision(3))}·d from it): the formula treats the wires as thin, and is used here only with at least ${SHIELDED_PAIR_MIN_WALL_OVER_D}·d from each wire’s centre to the screen.`,
    );
  const sigma2 = (h / D) ** 2;
  const k = Math.log(((2 * h) / d) * ((1 - sigma2) / (1 + sigma2)));
  const line = lineResult((MU_0 * muR * k) / Math.PI, (Math.PI * EPSILON_0 * epsilonR) / k, epsilonR, muR);
  const unshieldedZ0Ohm = Math.sqrt((MU_0 * muR) / (EPSILON_0 * epsilonR)) * (Math.log((2 * h) / d) / Math.PI);
  return { ...line, formula: SHIELDED_PAIR_FORMULA, unshieldedZ0Ohm };
}
