/**
 * One best location from several estimates of the same fault.
 *
 * Combination: the generalised least-squares mean (best linear unbiased
 * estimate) of estimates y with covariance V,
 *   x̂ = (1ᵀV⁻¹y)/(1ᵀV⁻¹1),   u²(x̂) = 1/(1ᵀV⁻¹1)
 * (A. C. Aitken, Proc. R. Soc. Edinburgh 55 (1935) 42; for combining
 * measurements: L. Lyons, D. Gibaut, P. Clifford, Nucl. Instrum. Methods A270
 * (1988) 110). With independent estimates V is diagonal and this is the
 * inverse-variance weighted mean x̂ = Σ(y_i/u_i²)/Σ(1/u_i²), u² = 1/Σ(1/u_i²).
 * V_ij is the sum of the budget lines the two estimates share (same source).
 *
 * Consistency: χ² = (y − x̂)ᵀV⁻¹(y − x̂) against the chi-square distribution with
 * n − 1 degrees of freedom at 95 % (for two independent estimates this is
 * |y₁ − y₂| > 1.96·√(u₁² + u₂²)). The Birge ratio √(χ²/(n − 1)) is reported
 * beside it (R. T. Birge, Phys. Rev. 40 (1932) 207). Estimates that fail the
 * test are not averaged: if leaving out exactly one estimate makes the rest
 * agree, and it lies beyond 1.96 σ from the rest's mean, it is named as the one
 * that stands apart and the rest give the location; otherwise no location is
 * given.
 */
import { LocateInputError } from './errors';
import { COVERAGE_FACTOR_95, WINDOW_COVERAGE_FACTOR, window95, type LocationEstimate, type LocateMethod } from './estimate';

/**
 * Upper 95 % points of the chi-square distribution for 1…10 degrees of freedom
 * (NIST/SEMATECH e-Handbook of Statistical Methods, §1.3.6.7.4, table of
 * critical values of the chi-square distribution).
 */
const CHI_SQUARE_95 = [3.841, 5.991, 7.815, 9.488, 11.07, 12.592, 14.067, 15.507, 16.919, 18.307];

/** χ²₀.₉₅(ν): the table up to 10, then the Wilson–Hilferty approximation (Proc. Natl. Acad. Sci. 17 (1931) 684). */
export function chiSquare95(dof: number): number {
  if (!(dof >= 1) || !Number.isInteger(dof)) throw new RangeError('degrees of freedom must be a whole number from 1');
  if (dof <= CHI_SQUARE_95.length) return CHI_SQUARE_95[dof - 1];
  const z = 1.6448536; // upper 5 % point of the standard normal distribution
  const a = 2 / (9 * dof);
  return dof * (1 - a + z * Math.sqrt(a)) ** 3;
}

export interface FusedMethod {
  id: string;
  method: LocateMethod;
  label: string;
  fromEnd: 'A' | 'B';
  distanceFromEndM: number;
  distanceFromAM: number;
  standardUncertaintyM: number;
  windowStartM: number;
  windowEndM: number;
  /** Whether it went into the best location. */
  used: boolean;
  /** Its weight in the best location (weights add up to 1; null when not used). */
  weight: number | null;
  /** (y − x̂)/σ(y − x̂): how far it lies from the best location, in standard deviations of the difference. */
  normalisedResidual: number | null;
  budget: LocationEstimate['budget'];
  notes: string[];
}

export interface ConsistencyTest {
  statistic: number;
  degreesOfFreedom: number;
  limit95: number;
  birgeRatio: number;
}

export interface Disagreement {
  a: string;
  b: string;
  differenceM: number;
  /** 1.96·σ of the difference: beyond it the two disagree. */
  limitM: number;
}

export interface FusedLocation {
  installedLengthM: number;
  consistent: boolean;
  distanceFromAM: number | null;
  standardUncertaintyM: number | null;
  windowStartM: number | null;
  windowEndM: number | null;
  coverageFactor: number;
  methods: FusedMethod[];
  test: ConsistencyTest | null;
  outlier: { id: string; label: string; method: LocateMethod; offsetM: number; sigmas: number } | null;
  disagreements: Disagreement[];
  /** What to check when the estimates disagree (empty when they agree). */
  checks: string[];
  verdict: string;
}

type Matrix = number[][];

/** Covariance of the estimates on the A axis from their shared budget lines. */
export function covarianceOf(estimates: LocationEstimate[]): Matrix {
  const bySource = estimates.map((e) => {
    const m = new Map<string, number>();
    for (const b of e.budget) m.set(b.source, (m.get(b.source) ?? 0) + b.contributionM);
    return m;
  });
  return estimates.map((_, i) =>
    estimates.map((__, j) => {
      let s = 0;
      for (const [src, ci] of bySource[i]) {
        const cj = bySource[j].get(src);
        if (cj !== undefined) s += ci * cj;
      }
      return s;
    }),
  );
}

/** Cholesky factor of a symmetric positive-definite matrix, or null when it is not. */
function cholesky(a: Matrix): Matrix | null {
  const n = a.length;
  const l: Matrix = a.map(() => new Array<number>(n).fill(0));
  for (let i = 0; i < n; i++) {
    for (let j = 0; j <= i; j++) {
      let s = a[i][j];
      for (let k = 0; k < j; k++) s -= l[i][k] * l[j][k];
      if (i === j) {
        if (!(s > 1e-12 * a[i][i])) return null;
        l[i][i] = Math.sqrt(s);
      } else l[i][j] = s / l[j][j];
    }
  }
  return l;
}

function solve(l: Matrix, b: number[]): number[] {
  const n = b.length;
  const y = new Array<number>(n);
  for (let i = 0; i < n; i++) {
    let s = b[i];
    for (let k = 0; k < i; k++) s -= l[i][k] * y[k];
    y[i] = s / l[i][i];
  }
  const x = new Array<number>(n);
  for (let i = n - 1; i >= 0; i--) {
    let s = y[i];
    for (let k = i + 1; k < n; k++) s -= l[k][i] * x[k];
    x[i] = s / l[i][i];
  }
  return x;
}

interface Gls {
  mean: number;
  variance: number;
  weights: number[];
  chiSquare: number;
}

function gls(y: number[], v: Matrix, ids: string[]): Gls {
  const l = cholesky(v);
  if (!l) {
    throw new LocateInputError(
      'SAME_INFORMATION',
      'estimates',
      `the estimates ${ids.join(', ')} carry the same information (their errors are fully shared): give each reading once`,
    );
  }
  const vInvOne = solve(
    l,
    y.map(() => 1),
  );
  const sum = vInvOne.reduce((s, w) => s + w, 0);
  const weights = vInvOne.map((w) => w / sum);
  const mean = weights.reduce((s, w, i) => s + w * y[i], 0);
  const r = y.map((yi) => yi - mean);
  const vInvR = solve(l, r);
  return { mean, variance: 1 / sum, weights, chiSquare: r.reduce((s, ri, i) => s + ri * vInvR[i], 0) };
}

function sub(v: Matrix, keep: number[]): Matrix {
  return keep.map((i) => keep.map((j) => v[i][j]));
}

export function fuseEstimates(estimates: LocationEstimate[], installedLengthM: number): FusedLocation {
  if (!Array.isArray(estimates) || estimates.length === 0)
    throw new LocateInputError('MISSING', 'estimates', 'give at least one reading to locate the fault from');
  const ids = new Set<string>();
  for (const e of estimates) {
    if (ids.has(e.id)) throw new LocateInputError('SAME_INFORMATION', 'estimates', `two estimates are both called '${e.id}'`);
    ids.add(e.id);
    if (!(e.standardUncertaintyM > 0))
      throw new LocateInputError('OUT_OF_RANGE', e.id, `${e.label}: its standard uncertainty must be more than zero`);
  }
  const n = estimates.length;
  const y = estimates.map((e) => e.distanceFromAM);
  const v = covarianceOf(estimates);
  const all = gls(y, v, [...ids]);
  const dof = n - 1;
  const test: ConsistencyTest | null =
    dof >= 1
      ? { statistic: all.chiSquare, degreesOfFreedom: dof, limit95: chiSquare95(dof), birgeRatio: Math.sqrt(all.chiSquare / dof) }
      : null;
  const disagreements: Disagreement[] = [];
  for (let i = 0; i < n; i++)
    for (let j = i + 1; j < n; j++) {
      const limitM = COVERAGE_FACTOR_95 * Math.sqrt(Math.max(0, v[i][i] + v[j][j] - 2 * v[i][j]));
      const differenceM = y[j] - y[i];
      if (Math.abs(differenceM) > limitM) disagreements.push({ a: estimates[i].id, b: estimates[j].id, differenceM, limitM });
    }
  const consistent = test === null || test.statistic <= test.limit95;

  let used = estimates.map(() => true);
  let result: Gls | null = all;
  let outlier: FusedLocation['outlier'] = null;
  if (!consistent) {
    result = null;
    used = estimates.map(() => false);
    const candidates: Array<{ i: number; rest: number[]; fit: Gls; z: number; offset: number }> = [];
    if (n >= 3) {
      for (let i = 0; i < n; i++) {
        const rest = estimates.map((_, k) => k).filter((k) => k !== i);
        const fit = gls(
          rest.map((k) => y[k]),
          sub(v, rest),
          rest.map((k) => estimates[k].id),
        );
        if (fit.chiSquare > chiSquare95(rest.length - 1)) continue;
        const covWithRest = rest.reduce((s, k, idx) => s + fit.weights[idx] * v[i][k], 0);
        const offset = y[i] - fit.mean;
        const z = offset / Math.sqrt(Math.max(1e-300, v[i][i] + fit.variance - 2 * covWithRest));
        if (Math.abs(z) > COVERAGE_FACTOR_95) candidates.push({ i, rest, fit, z, offset });
      }
    }
    if (candidates.length === 1) {
      const c = candidates[0];
      result = c.fit;
      used = estimates.map((_, k) => k !== c.i);
      const e = estimates[c.i];
      outlier = { id: e.id, label: e.label, method: e.method, offsetM: c.offset, sigmas: Math.abs(c.z) };
    }
  }

  const usedIdx = estimates.map((_, k) => k).filter((k) => used[k]);
  const methods: FusedMethod[] = estimates.map((e, k) => {
    const idx = usedIdx.indexOf(k);
    let residual: number | null = null;
    if (result) {
      const w = usedIdx.map((_, q) => result!.weights[q]);
      const cov = usedIdx.reduce((s, j, q) => s + w[q] * v[k][j], 0);
      const varDiff = used[k] ? v[k][k] - result.variance : v[k][k] + result.variance - 2 * cov;
      residual = varDiff > 1e-12 * v[k][k] ? (e.distanceFromAM - result.mean) / Math.sqrt(varDiff) : 0;
    }
    return {
      id: e.id,
      method: e.method,
      label: e.label,
      fromEnd: e.fromEnd,
      distanceFromEndM: e.distanceFromEndM,
      distanceFromAM: e.distanceFromAM,
      standardUncertaintyM: e.standardUncertaintyM,
      ...window95(e.distanceFromAM, e.standardUncertaintyM, installedLengthM),
      used: used[k],
      weight: result && idx >= 0 ? result.weights[idx] : null,
      normalisedResidual: residual,
      budget: e.budget,
      notes: e.notes,
    };
  });

  const u = result ? Math.sqrt(result.variance) : null;
  const win = result && u !== null ? window95(result.mean, u, installedLengthM) : null;
  const checks = consistent ? [] : whatToCheck(estimates, outlier?.id ?? null, disagreements, installedLengthM);
  return {
    installedLengthM,
    consistent,
    distanceFromAM: result ? result.mean : null,
    standardUncertaintyM: u,
    windowStartM: win ? win.windowStartM : null,
    windowEndM: win ? win.windowEndM : null,
    coverageFactor: WINDOW_COVERAGE_FACTOR,
    methods,
    test,
    outlier,
    disagreements,
    checks,
    verdict: verdictOf(n, consistent, test, outlier, result, estimates, disagreements),
  };
}

function fmt(x: number, digits = 1) {
  return x.toFixed(digits);
}

function verdictOf(
  n: number,
  consistent: boolean,
  test: ConsistencyTest | null,
  outlier: FusedLocation['outlier'],
  result: Gls | null,
  estimates: LocationEstimate[],
  disagreements: Disagreement[],
): string {
  if (!test) return 'One reading only: nothing to compare it with.';
  const stat = `χ² = ${fmt(test.statistic, 2)} on ${test.degreesOfFreedom} degree${test.degreesOfFreedom === 1 ? '' : 's'} of freedom, 95 % limit ${fmt(test.limit95, 2)}`;
  if (consistent) return `The ${n} readings agree (${stat}).`;
  if (outlier && result) {
    return (
      `The readings disagree (${stat}). ${outlier.label} stands apart, ${fmt(Math.abs(outlier.offsetM))} m ` +
      `${outlier.offsetM > 0 ? 'further from' : 'nearer to'} end A than the others (${fmt(outlier.sigmas)} σ); ` +
      `the other ${n - 1} agree and give the location without it.`
    );
  }
  const label = (id: string) => estimates.find((e) => e.id === id)!.label;
  const pairs = disagreements.map(
    (d) => `${label(d.a)} and ${label(d.b)} are ${fmt(Math.abs(d.differenceM))} m apart (limit ${fmt(d.limitM)} m)`,
  );
  return (
    `The readings disagree (${stat}) and no single one stands apart, so they are not averaged into a location` +
    `${pairs.length ? `: ${pairs.join('; ')}` : ''}.` +
    (n === 2 ? ' A third, independent method would tell which one is wrong.' : '')
  );
}

const CHECKS: Record<LocateMethod, string[]> = {
  'tdr-single-ended': [
    'the velocity factor: calibrate it on a known length of the same cable',
    'that the reflection taken is the fault and not a joint, a tee or an echo',
  ],
  'tdr-two-ended': [
    'the installed length of the run: records, slack coils at joints and terminations',
    'that the traces from both ends show the same fault',
  ],
  'murray-loop': [
    'that the looped conductor is sound and the far-end strap is tight',
    'that the bridge leads are on the faulty and sound conductors the right way round (wrong pair)',
    'the conductor sizes and sections entered for the route',
  ],
  'varley-loop': [
    'that the looped conductor is sound and the far-end strap is tight',
    "the ratio arms and that the rheostat is in the faulty conductor's arm",
    'the conductor sizes, sections and temperature entered for the route',
  ],
  capacitance: [
    'that the right pair or core was measured (wrong pair) against the same reference as the comparison value',
    'the capacitance per metre and that the far end of the conductor is open',
  ],
  'loop-resistance': [
    'the resistance of the short itself: a resistive short reads long',
    'the test-lead resistance, the conductor temperature and the conductor sizes',
  ],
};

function whatToCheck(
  estimates: LocationEstimate[],
  outlierId: string | null,
  disagreements: Disagreement[],
  L: number,
): string[] {
  const suspects = outlierId
    ? estimates.filter((e) => e.id === outlierId)
    : estimates.filter((e) => disagreements.some((d) => d.a === e.id || d.b === e.id));
  const checks: string[] = [];
  const singleA = estimates.find((e) => e.method === 'tdr-single-ended' && e.fromEnd === 'A');
  const singleB = estimates.find((e) => e.method === 'tdr-single-ended' && e.fromEnd === 'B');
  if (singleA && singleB && suspects.some((e) => e.method === 'tdr-single-ended')) {
    const sum = singleA.distanceFromEndM + singleB.distanceFromEndM;
    const off = sum / L - 1;
    if (Math.abs(off) > 0.005) {
      checks.push(
        `the TDR readings from the two ends add up to ${fmt(sum)} m on a ${fmt(L)} m run: the velocity factor is about ` +
          `${fmt(Math.abs(off) * 100)} % too ${off > 0 ? 'high' : 'low'}, or the run is ${off > 0 ? 'longer' : 'shorter'} than recorded (slack)`,
      );
    }
  }
  const fromB = suspects.filter((e) => e.fromEnd === 'B');
  if (fromB.length > 0 && fromB.length === suspects.length)
    checks.push('the installed length: readings from end B are placed from A through it, slack included');
  for (const m of new Set(suspects.map((e) => e.method))) for (const c of CHECKS[m]) if (!checks.includes(c)) checks.push(c);
  return checks;
}
