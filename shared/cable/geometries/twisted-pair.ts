/**
 * Twisted pair: two insulated round wires of conductor diameter d twisted
 * together, their centres D apart (D is the insulated diameter when the
 * insulation touches, as it does in a pair).
 *
 * The conductors make a two-wire line, Z0 = (η0/π)·√(μr/εeff)·acosh(D/d).
 * Only part of the field runs in the insulation, so the line sees an
 * effective permittivity between the surrounding medium's and the
 * insulation's. Two published ways of setting it:
 *
 * - film insulation (enamelled magnet wire), with the twist: Lefferson's
 *   εeff = ε1 + q·(εr − ε1), q = 0.25 + 0.0004·θ², θ = atan(π·D/lay) in
 *   degrees (0.001 in place of 0.0004 for soft PTFE film), fitted for pitch
 *   angles θ from 20° to 45°;
 * - thick insulation touching: Johnson & Graham's rule that the field between
 *   touching insulated wires is nearly all in the insulation, εeff ≈ εr.
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

export const TWISTED_PAIR_FORMULAS = {
  twist: {
    name: 'Lefferson’s twisted-pair formula with the twist-angle correction',
    formula:
      'Z0 = (η0/π)·√(μr/εeff)·acosh(D/d), εeff = ε1 + q·(εr − ε1), q = 0.25 + 0.0004·θ² (0.001·θ² for PTFE film), θ = atan(π·D/lay) in degrees',
    source:
      'P. Lefferson, “Twisted magnet wire transmission line”, IEEE Trans. Parts, Hybrids and Packaging PHP-7 (1971) 148–154; restated in B. C. Wadell, Transmission Line Design Handbook (Artech House, 1991), pp. 68–69',
    validity: 'film-insulated (magnet) wire, pitch angle θ from 20° to 45°, and only while q stays at or below 1',
  },
  touching: {
    name: 'the two-wire formula with the insulation’s εr (insulation touching)',
    formula: 'Z0 = (η0/π)·√(μr/εr)·acosh(D/d), the insulation’s εr taken for the whole field',
    source:
      'H. W. Johnson and M. Graham, High-Speed Digital Design: A Handbook of Black Magic (Prentice Hall, 1993), p. 186 (for wire pairs with the insulation touching, use the insulation’s εr); acosh form: D. M. Pozar, Microwave Engineering, 4th ed., Table 2.1',
    validity:
      'insulated wires whose insulation touches (D = the insulated diameter); it puts all the field in the insulation, so the VF it gives is the lowest the pair can have',
  },
} satisfies Record<string, FormulaSource>;

export type TwistedPairMethod = 'twist' | 'touching';
/** Film insulation follows q = 0.25 + 0.0004·θ²; soft PTFE film q = 0.25 + 0.001·θ². */
export type FilmKind = 'film' | 'ptfe';
const Q_SLOPE: Record<FilmKind, number> = { film: 0.0004, ptfe: 0.001 };

export const TWIST_ANGLE_MIN_DEG = 20;
export const TWIST_ANGLE_MAX_DEG = 45;

export interface TwistedPairInput {
  method: TwistedPairMethod;
  /** Conductor diameter d, m. */
  wireDiameter: number;
  /** Centre spacing D, m: the insulated diameter when the insulation touches. */
  centreSpacing: number;
  /** The insulation's εr. */
  insulationEpsilonR: number;
  /** One full twist's length (lay), m; needed for the twist method. */
  layLength?: number;
  film?: FilmKind;
  /** The medium around the pair (air: 1). */
  surroundingEpsilonR?: number;
  muR?: number;
}

export interface TwistedPairResult extends LineGeometryResult {
  formula: FormulaSource;
  epsilonEff: number;
  /** Pitch angle θ, degrees (twist method). */
  twistAngleDeg?: number;
  /** Filling fraction q (twist method). */
  q?: number;
}

/** Pitch angle θ = atan(π·D/lay), degrees. */
export function twistAngleDeg(centreSpacing: number, layLength: number): number {
  return (Math.atan((Math.PI * centreSpacing) / layLength) * 180) / Math.PI;
}

export function twistedPair(input: TwistedPairInput): TwistedPairResult {
  const { method, wireDiameter: d, centreSpacing: D, insulationEpsilonR: er, surroundingEpsilonR: e1 = 1, muR = 1 } = input;
  positive('wireDiameter', d, 'The conductor diameter d');
  positive('centreSpacing', D, 'The centre spacing D');
  if (D <= d)
    throw new DerivationError(
      'centreSpacing',
      'The centre spacing D must be larger than the conductor diameter d (the conductors would touch).',
    );
  atLeastOne('insulationEpsilonR', er, 'The insulation’s εr');
  atLeastOne('surroundingEpsilonR', e1, 'The surrounding εr');
  atLeastOne('muR', muR, 'The relative permeability μr');
  if (er < e1) throw new DerivationError('insulationEpsilonR', 'The insulation’s εr must be at least the surrounding medium’s.');

  const k = Math.acosh(D / d);
  let formula: FormulaSource;
  let epsilonEff: number;
  let extra: Pick<TwistedPairResult, 'twistAngleDeg' | 'q'> = {};
  if (method === 'touching') {
    formula = TWISTED_PAIR_FORMULAS.touching;
    epsilonEff = er;
  } else {
    const lay = input.layLength ?? Number.NaN;
    positive('layLength', lay, 'The lay length (one full twist)');
    const theta = twistAngleDeg(D, lay);
    const film = input.film ?? 'film';
    const q = 0.25 + Q_SLOPE[film] * theta * theta;
    const shown = Number(theta.toPrecision(3));
    if (theta < TWIST_ANGLE_MIN_DEG)
      throw new DerivationError(
        'layLength',
        `The pitch angle is ${shown}°: Lefferson’s twist correction is fitted for ${TWIST_ANGLE_MIN_DEG}° to ${TWIST_ANGLE_MAX_DEG}°. The twist is looser than that; use the insulation-touching rule or the two-dielectric form.`,
      );
    if (theta > TWIST_ANGLE_MAX_DEG)
      throw new DerivationError(
        'layLength',
        `The pitch angle is ${shown}°: Lefferson’s twist correction is fitted for ${TWIST_ANGLE_MIN_DEG}° to ${TWIST_ANGLE_MAX_DEG}°; the twist is tighter than that.`,
      );
    if (q > 1)
      throw new DerivationError(
        'layLength',
        `At a pitch angle of ${shown}° the formula’s filling fraction q is ${Number(q.toPrecision(3))}, more than all of the field in the insulation; ${film === 'ptfe' ? 'for PTFE film' : 'for film insulation'} it holds only up to ${Number(Math.sqrt(0.75 / Q_SLOPE[film]).toPrecision(3))}°.`,
      );
    formula = TWISTED_PAIR_FORMULAS.twist;
    epsilonEff = e1 + q * (er - e1);
    extra = { twistAngleDeg: theta, q };
  }
  const line = lineResult((MU_0 * muR * k) / Math.PI, (Math.PI * EPSILON_0 * epsilonEff) / k, epsilonEff, muR);
  return { ...line, formula, epsilonEff, ...extra };
}
