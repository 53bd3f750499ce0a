/**
 * Every location method gives a distance from a stated end of the cable with
 * a standard uncertainty built from that method's own error sources, and turns
 * it into a position on one axis: metres from end A.
 *
 * The uncertainty follows the law of propagation of uncertainty, JCGM 100:2008
 * (GUM) §5.1.2 eq. (10): u_c² = Σ (∂f/∂x_i · u(x_i))², with the sensitivity
 * coefficients ∂f/∂x_i taken by central differences around the readings
 * (GUM §5.1.3 note 2 allows them to be evaluated numerically). Each term
 * c_i·u(x_i) is kept, signed, as a line of the estimate's uncertainty budget.
 * A budget line names its error source: two estimates that name the same
 * source (the installed length, the velocity factor, one set of conductor data)
 * share that error, and the fusion counts it once, as a covariance.
 */
import { LocateInputError, nonNegative, positive } from './errors';

export type CableEnd = 'A' | 'B';

export type LocateMethod =
  'tdr-single-ended' | 'tdr-two-ended' | 'murray-loop' | 'varley-loop' | 'capacitance' | 'loop-resistance';

export const METHOD_LABELS: Record<LocateMethod, string> = {
  'tdr-single-ended': 'TDR',
  'tdr-two-ended': 'TDR from both ends',
  'murray-loop': 'Murray loop',
  'varley-loop': 'Varley loop',
  capacitance: 'Capacitance',
  'loop-resistance': 'Loop resistance',
};

/** Source id of the installed length's error; every estimate that uses the length shares it. */
export const INSTALLED_LENGTH_SOURCE = 'installed-length';

export interface BudgetLine {
  /** Error source. The same id in two estimates means the same error. */
  source: string;
  label: string;
  /** Sensitivity × standard uncertainty: what this source moves the position from end A by, metres (signed). */
  contributionM: number;
}

export interface LocationEstimate {
  /** Unique among the estimates handed to one fusion. */
  id: string;
  method: LocateMethod;
  label: string;
  /** The end the method measured from. */
  fromEnd: CableEnd;
  distanceFromEndM: number;
  distanceFromAM: number;
  standardUncertaintyM: number;
  budget: BudgetLine[];
  /** Things the technician should know about this reading (assumptions, sanity checks). */
  notes: string[];
}

/** The cable run every estimate is placed on. */
export interface CableRunInput {
  installedLengthM: number;
  /** Standard uncertainty of the installed length (records, slack), metres. Default 0: the length is taken as exact. */
  installedLengthUM?: number;
}

export interface UncertainInput {
  value: number;
  /** Standard uncertainty, in the input's own unit. */
  u: number;
  label: string;
  /** A shared error source id; without one the error belongs to this estimate alone. */
  source?: string;
}

/** Coverage factor for a 95 % two-sided limit of a normal distribution (GUM §6.2, Annex G): the agreement tests between readings. */
export const COVERAGE_FACTOR_95 = 1.96;

/**
 * Coverage factor of every window shown to dig by: k = 2, for about 95 %
 * (JCGM 100:2008 §6.2.2), the factor the trace engine expands its own windows
 * with (shared/trace/uncertainty.ts). One reading alone then has one window,
 * on its trace, its finding and its best location alike.
 */
export const WINDOW_COVERAGE_FACTOR = 2;

export function checkedRun(run: CableRunInput) {
  const L = positive('installedLengthM', run.installedLengthM, 'installed length');
  const uL =
    run.installedLengthUM === undefined
      ? 0
      : nonNegative('installedLengthUM', run.installedLengthUM, 'uncertainty of the installed length');
  return { installedLengthM: L, installedLengthUM: uL };
}

/**
 * Builds an estimate from `distanceFromEnd(x)`: the method's formula for the
 * distance from its test end given the readings x (which always include
 * `installedLengthM`). Distances that leave the cable are refused.
 */
export function buildEstimate<K extends string>(spec: {
  id: string;
  method: LocateMethod;
  label?: string;
  fromEnd: CableEnd;
  run: CableRunInput;
  inputs: Record<K, UncertainInput>;
  distanceFromEnd: (x: Record<K | 'installedLengthM', number>) => number;
  notes?: string[];
  field: string;
}): LocationEstimate {
  if (spec.fromEnd !== 'A' && spec.fromEnd !== 'B')
    throw new LocateInputError(
      'OUT_OF_RANGE',
      `${spec.field}.fromEnd`,
      `the end measured from must be A or B, got '${String(spec.fromEnd)}'`,
    );
  const run = checkedRun(spec.run);
  const label = spec.label ?? `${METHOD_LABELS[spec.method]} from end ${spec.fromEnd}`;
  const inputs = {
    ...spec.inputs,
    installedLengthM: {
      value: run.installedLengthM,
      u: run.installedLengthUM,
      label: 'installed length',
      source: INSTALLED_LENGTH_SOURCE,
    },
  } as Record<K | 'installedLengthM', UncertainInput>;
  const onAxisA = (x: Record<K | 'installedLengthM', number>) =>
    spec.fromEnd === 'A' ? spec.distanceFromEnd(x) : x.installedLengthM - spec.distanceFromEnd(x);
  const x0 = valuesOf(inputs);
  const distanceFromEndM = spec.distanceFromEnd(x0);
  if (!(distanceFromEndM >= -1e-9 && distanceFromEndM <= run.installedLengthM * (1 + 1e-9))) {
    throw new LocateInputError(
      'BEYOND_CABLE',
      spec.field,
      `${label}: the readings put the fault ${distanceFromEndM.toFixed(1)} m from end ${spec.fromEnd}, ` +
        `outside the ${run.installedLengthM} m cable`,
    );
  }
  const budget = propagate(onAxisA, inputs, spec.id);
  return {
    id: spec.id,
    method: spec.method,
    label,
    fromEnd: spec.fromEnd,
    distanceFromEndM,
    distanceFromAM: onAxisA(x0),
    standardUncertaintyM: Math.sqrt(budget.reduce((s, b) => s + b.contributionM ** 2, 0)),
    budget,
    notes: spec.notes ?? [],
  };
}

function valuesOf<K extends string>(inputs: Record<K, UncertainInput>): Record<K, number> {
  const x = {} as Record<K, number>;
  for (const k of Object.keys(inputs) as K[]) x[k] = inputs[k].value;
  return x;
}

/**
 * Budget lines c_i·u(x_i) by central differences, with a step of a thousandth
 * of the input's uncertainty; one-sided where a step would leave the formula's
 * domain (a ratio at its limit).
 */
export function propagate<K extends string>(
  f: (x: Record<K, number>) => number,
  inputs: Record<K, UncertainInput>,
  localPrefix: string,
): BudgetLine[] {
  const x0 = valuesOf(inputs);
  const y0 = f(x0);
  const lines: BudgetLine[] = [];
  for (const key of Object.keys(inputs) as K[]) {
    const inp = inputs[key];
    if (!(inp.u > 0)) continue;
    const h = inp.u * 1e-3;
    const at = (dx: number) => {
      try {
        const y = f({ ...x0, [key]: x0[key] + dx });
        return Number.isFinite(y) ? y : null;
      } catch {
        return null;
      }
    };
    const up = at(h);
    const down = at(-h);
    const slope =
      up !== null && down !== null ? (up - down) / (2 * h) : up !== null ? (up - y0) / h : down !== null ? (y0 - down) / h : 0;
    // A source the result does not depend on (it cancels, as the conductor data in a uniform loop) is left out of the budget.
    if (Math.abs(slope * inp.u) < 1e-6) continue;
    lines.push({ source: inp.source ?? `${localPrefix}:${key}`, label: inp.label, contributionM: slope * inp.u });
  }
  return lines;
}

/** Standard uncertainty of a reading shown to a resolution `step` with a ±`halfWidth` accuracy: both rectangular (GUM §4.3.7, F.2.2.1). */
export function readingU(step: number, halfWidth = 0): number {
  return Math.sqrt((step / Math.sqrt(12)) ** 2 + (halfWidth / Math.sqrt(3)) ** 2);
}

/** The 95 % window around a position, kept on the cable. */
export function window95(distanceFromAM: number, standardUncertaintyM: number, installedLengthM: number) {
  const half = WINDOW_COVERAGE_FACTOR * standardUncertaintyM;
  return {
    windowStartM: Math.max(0, distanceFromAM - half),
    windowEndM: Math.min(installedLengthM, distanceFromAM + half),
  };
}
