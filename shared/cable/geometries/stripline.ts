/**
 * Stripline: a flat strip of width W and thickness t centred between two
 * ground planes b apart, in a uniform dielectric εr (jumpers, fixtures).
 *
 * A strip of negligible thickness has an exact solution by conformal mapping
 * (Cohn 1954). A strip of real thickness uses Cohn's 1955 closed forms: one
 * for a wide strip (its two edges' fringing fields do not interact) and one
 * for a narrow strip (replaced by a round conductor of equivalent diameter).
 * Either way the line is uniformly filled, so Z0 = Z0,air·√(μr/εr) and the
 * velocity is c/√(εr·μr) whatever W, t and b are.
 */
import {
  atLeastOne,
  DerivationError,
  lineFromAirImpedance,
  positive,
  type FormulaSource,
  type LineGeometryResult,
} from '../derivations';
import { ETA_0 } from '../propagation';
import { agm } from './elliptic';

export const STRIPLINE_FORMULAS = {
  thinExact: {
    name: 'Cohn’s exact thin-strip stripline formula',
    formula: 'Z0 = (η0/4)·√(μr/εr)·K(k)/K(k′), k = sech(πW/2b), k′ = tanh(πW/2b)',
    source:
      'S. B. Cohn, “Characteristic impedance of the shielded-strip transmission line”, IRE Trans. Microwave Theory Tech. MTT-2 (July 1954) 52–57; its curve fit with the 0.441 fringing term is D. M. Pozar, Microwave Engineering, 4th ed. (Wiley, 2012), §3.7',
    validity:
      'a strip of negligible thickness centred between the planes, any W/b (exact); accepted here for W/b from 0.01 to 100',
  },
  thickWide: {
    name: 'Cohn’s thick-strip stripline formula for a wide strip',
    formula:
      'Z0 = (η0/4)·√(μr/εr) / (W/(b−t) + Cf/ε), Cf/ε = (1/π)·[2/(1−x)·ln(1/(1−x)+1) − (1/(1−x)−1)·ln(1/(1−x)²−1)], x = t/b',
    source: 'S. B. Cohn, “Problems in strip transmission lines”, IRE Trans. Microwave Theory Tech. MTT-3 (March 1955) 119–126',
    validity: 'W/(b−t) ≥ 0.35, where the two edges’ fringing fields do not interact; accepted here for t/b below 0.25',
  },
  thickNarrow: {
    name: 'Cohn’s thick-strip stripline formula for a narrow strip',
    formula: 'Z0 = (η0/2π)·√(μr/εr)·ln(4b/(π·d0)), d0 = (W/2)·[1 + (t/(πW))·(1 + ln(4πW/t)) + 0.51π·(t/W)²]',
    source:
      'S. B. Cohn, “Problems in strip transmission lines”, IRE Trans. Microwave Theory Tech. MTT-3 (March 1955) 119–126 (the 0.51π term and the t/W limit quoted from memory)',
    validity: 'W/(b−t) below 0.35, t/W up to 0.11 and t/b below 0.25',
  },
} satisfies Record<string, FormulaSource>;

/** Above this t/b neither thick-strip form is used here (the narrow form is published for t/b < 0.25). */
export const STRIPLINE_MAX_T_OVER_B = 0.25;
/** Where Cohn's wide-strip form takes over from the narrow one. */
export const STRIPLINE_WIDE_FROM = 0.35;
/** The narrow-strip form's equivalent diameter holds for t/W up to this. */
export const STRIPLINE_NARROW_MAX_T_OVER_W = 0.11;

export interface StriplineInput {
  /** Strip width W, m. */
  width: number;
  /** Plane-to-plane spacing b, m. */
  groundSpacing: number;
  /** Strip thickness t, m (0 for a thin strip). */
  thickness?: number;
  epsilonR: number;
  muR?: number;
}

export interface StriplineResult extends LineGeometryResult {
  formula: FormulaSource;
  /** Z0 with vacuum in place of the dielectric. */
  z0AirOhm: number;
  /** The exact thin-strip Z0 at this W/b, to set beside a thick-strip result. */
  thinStripZ0Ohm: number;
}

/** Exact Z0 in vacuum of a zero-thickness strip: (η0/4)·K(k)/K(k′) = (η0/4)·AGM(1, k)/AGM(1, k′). */
export function thinStripZ0Air(widthOverSpacing: number): number {
  const x = (Math.PI * widthOverSpacing) / 2;
  const k = 1 / Math.cosh(x);
  const kPrime = Math.tanh(x);
  // K(k) = π/(2·AGM(1, k′)), K(k′) = π/(2·AGM(1, k)).
  return (ETA_0 / 4) * (agm(1, k) / agm(1, kPrime));
}

/** Cohn's fringing term Cf/ε of a thick semi-infinite strip, x = t/b; → 2·ln 2/π = 0.4413 as t → 0. */
export function striplineFringing(tOverB: number): number {
  const x = tOverB;
  const a = 1 / (1 - x);
  const second = x === 0 ? 0 : (a - 1) * Math.log(a * a - 1);
  return (2 * a * Math.log(a + 1) - second) / Math.PI;
}

export function stripline(input: StriplineInput): StriplineResult {
  const { width: w, groundSpacing: b, thickness: t = 0, epsilonR, muR = 1 } = input;
  positive('width', w, 'The strip width W');
  positive('groundSpacing', b, 'The plane-to-plane spacing b');
  if (!Number.isFinite(t) || t < 0) throw new DerivationError('thickness', 'The strip thickness t must be 0 or more.');
  atLeastOne('epsilonR', epsilonR, 'The relative permittivity εr');
  atLeastOne('muR', muR, 'The relative permeability μr');
  const wb = w / b;
  if (wb < 0.01 || wb > 100)
    throw new DerivationError(
      'width',
      `W/b is ${Number(wb.toPrecision(3))}: the calculator takes W/b from 0.01 to 100 (a thinner strip is a wire; a wider one is a parallel-plate line).`,
    );
  if (t / b >= STRIPLINE_MAX_T_OVER_B)
    throw new DerivationError(
      'thickness',
      `t/b is ${Number((t / b).toPrecision(3))}: Cohn’s thick-strip formulas are used here only for t/b below ${STRIPLINE_MAX_T_OVER_B} (a strip that thick fills too much of the space between the planes).`,
    );

  const thinStripZ0Ohm = thinStripZ0Air(wb) * Math.sqrt(muR / epsilonR);
  let formula: FormulaSource;
  let z0AirOhm: number;
  if (t === 0) {
    formula = STRIPLINE_FORMULAS.thinExact;
    z0AirOhm = thinStripZ0Air(wb);
  } else if (w / (b - t) >= STRIPLINE_WIDE_FROM) {
    formula = STRIPLINE_FORMULAS.thickWide;
    z0AirOhm = ETA_0 / 4 / (w / (b - t) + striplineFringing(t / b));
  } else {
    if (t / w > STRIPLINE_NARROW_MAX_T_OVER_W)
      throw new DerivationError(
        'thickness',
        `t/W is ${Number((t / w).toPrecision(3))}: for a narrow strip (W/(b−t) below ${STRIPLINE_WIDE_FROM}) Cohn’s formula holds only for a flat strip, t/W up to ${STRIPLINE_NARROW_MAX_T_OVER_W}.`,
      );
    formula = STRIPLINE_FORMULAS.thickNarrow;
    const r = t / w;
    const d0 = (w / 2) * (1 + (r / Math.PI) * (1 + Math.log((4 * Math.PI) / r)) + 0.51 * Math.PI * r * r);
    z0AirOhm = (ETA_0 / (2 * Math.PI)) * Math.log((4 * b) / (Math.PI * d0));
  }
  return { ...lineFromAirImpedance(z0AirOhm, epsilonR, muR), formula, z0AirOhm, thinStripZ0Ohm };
}
