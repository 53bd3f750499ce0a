/**
 * A line whose field runs through two materials: foam (polymer and gas),
 * semi-air-spaced coax (a spacer or tube and air), twin lead (the web and the
 * air around it). The line's geometry in vacuum gives Z0,air; the two
 * materials give one effective εr from a stated filling fraction q (the
 * share of material 2); then Z0 = Z0,air·√(μr/εeff) and u = c/√(εeff·μr).
 *
 * How the two mix depends on how the field meets them:
 * - side by side along the field lines (capacitances in parallel):
 *   εeff = (1 − q)·ε1 + q·ε2, Wheeler's filling-fraction form;
 * - one after the other across the field lines (in series):
 *   1/εeff = (1 − q)/ε1 + q/ε2; exact for concentric layers in coax when q is
 *   the layer's share of ln(D/d);
 * - finely mixed, as in a foam: Looyenga's εeff^⅓ = (1 − q)·ε1^⅓ + q·ε2^⅓,
 *   q the polymer's volume fraction (foam density / solid density).
 * For any arrangement at volume fraction q the result lies between the series
 * and the parallel values (Wiener's bounds), which are shown beside it.
 */
import {
  atLeastOne,
  coax,
  DerivationError,
  lineFromAirImpedance,
  twoWire,
  type FormulaSource,
  type LineGeometryResult,
} from '../derivations';

export type MixingRule = 'parallel' | 'series' | 'foam';

export const MIXING_FORMULAS: Record<MixingRule, FormulaSource> = {
  parallel: {
    name: 'the two-dielectric line with the filling-fraction (parallel) rule',
    formula: 'εeff = (1 − q)·ε1 + q·ε2, Z0 = Z0,air·√(μr/εeff), VF = 1/√(εeff·μr)',
    source:
      'H. A. Wheeler, “Transmission-line properties of parallel strips separated by a dielectric sheet”, IEEE Trans. Microwave Theory Tech. MTT-13 (1965) 172–185 (filling fraction q); the upper of O. Wiener’s bounds, Abh. Sächs. Ges. Wiss. 32 (1912) 509–604',
    validity: 'field lines that run through one material or the other side by side (twin lead’s web and air); q from 0 to 1',
  },
  series: {
    name: 'the two-dielectric line with the layered (series) rule',
    formula: '1/εeff = (1 − q)/ε1 + q/ε2, Z0 = Z0,air·√(μr/εeff), VF = 1/√(εeff·μr)',
    source:
      'the lower of O. Wiener’s bounds, Abh. Sächs. Ges. Wiss. 32 (1912) 509–604; exact for concentric layers in coax with q the layer’s share of ln(D/d)',
    validity: 'field lines that cross both materials in turn (a tube or gas gap around the conductor); q from 0 to 1',
  },
  foam: {
    name: 'the two-dielectric line with Looyenga’s mixing rule',
    formula: 'εeff^(1/3) = (1 − q)·ε1^(1/3) + q·ε2^(1/3), Z0 = Z0,air·√(μr/εeff), VF = 1/√(εeff·μr)',
    source: 'H. Looyenga, “Dielectric constants of heterogeneous mixtures”, Physica 31 (1965) 401–406',
    validity: 'a fine, even mixture such as a foam, q the solid’s volume fraction (foam density / solid density), from 0 to 1',
  },
};

export interface Mixture {
  epsilonEff: number;
  /** Wiener's bounds at this fraction: series (lowest) and parallel (highest). */
  lowest: number;
  highest: number;
}

/** The effective εr of two materials, ε1 (fraction 1 − q) and ε2 (fraction q). */
export function mixPermittivity(epsilon1: number, epsilon2: number, fraction: number, rule: MixingRule): Mixture {
  atLeastOne('epsilon1', epsilon1, 'The first material’s εr');
  atLeastOne('epsilon2', epsilon2, 'The second material’s εr');
  if (!Number.isFinite(fraction) || fraction < 0 || fraction > 1)
    throw new DerivationError('fraction', 'The filling fraction q must be from 0 (all material 1) to 1 (all material 2).');
  const q = fraction;
  const highest = (1 - q) * epsilon1 + q * epsilon2;
  const lowest = 1 / ((1 - q) / epsilon1 + q / epsilon2);
  const epsilonEff =
    rule === 'parallel' ? highest : rule === 'series' ? lowest : ((1 - q) * Math.cbrt(epsilon1) + q * Math.cbrt(epsilon2)) ** 3;
  return { epsilonEff, lowest, highest };
}

export type TwoDielectricGeometry =
  { kind: 'coax'; outerDiameter: number; innerDiameter: number } | { kind: 'two-wire'; wireDiameter: number; spacing: number };

export interface TwoDielectricInput {
  geometry: TwoDielectricGeometry;
  epsilon1: number;
  epsilon2: number;
  /** Filling fraction q of material 2, 0–1. */
  fraction: number;
  rule: MixingRule;
  muR?: number;
}

export interface TwoDielectricResult extends LineGeometryResult, Mixture {
  formula: FormulaSource;
  /** Z0 of the same conductors in vacuum. */
  z0AirOhm: number;
  /** VF at Wiener's bounds: the slowest (parallel) and fastest (series) any arrangement at this fraction can be. */
  vfRange: { slowest: number; fastest: number };
}

export function twoDielectricLine(input: TwoDielectricInput): TwoDielectricResult {
  const { geometry: g, epsilon1, epsilon2, fraction, rule, muR = 1 } = input;
  atLeastOne('muR', muR, 'The relative permeability μr');
  const z0AirOhm =
    g.kind === 'coax'
      ? coax({ outerDiameter: g.outerDiameter, innerDiameter: g.innerDiameter, epsilonR: 1 }).z0Ohm
      : twoWire({ wireDiameter: g.wireDiameter, spacing: g.spacing, epsilonR: 1 }).z0Ohm;
  const mix = mixPermittivity(epsilon1, epsilon2, fraction, rule);
  const line = lineFromAirImpedance(z0AirOhm, mix.epsilonEff, muR);
  return {
    ...line,
    ...mix,
    formula: MIXING_FORMULAS[rule],
    z0AirOhm,
    vfRange: { slowest: 1 / Math.sqrt(mix.highest * muR), fastest: 1 / Math.sqrt(mix.lowest * muR) },
  };
}
