/**
 * Cable loss, and the shape it gives a reflection.
 *
 * A cable's attenuation is modelled with its two usual terms, α(f) = s·√f + g·f
 * nepers per metre: conductor (skin-effect) loss rising as √f and dielectric
 * loss rising as f (D. M. Pozar, "Microwave Engineering", 4th ed., §2.7). Over
 * a round trip of 2d metres they act on the wave as
 *
 *  - skin: H(s) = exp(−K·√s), K = 2d·s/√π, whose step response is
 *    erfc(K / 2√t) after the delay (R. L. Wigington and N. S. Nahman,
 *    "Transient analysis of coaxial cables considering skin effect",
 *    Proc. IRE 45 (1957) 166); |H| = exp(−K·√(πf)) = exp(−2d·s·√f);
 *  - dielectric: |H| = exp(−2d·g·f) = exp(−c·|ω|), c = d·g/π, either with
 *    zero phase, a Cauchy (Lorentzian) spread c/(π(c² + t²)) centred on the
 *    delay, or causal, with the phase a loss rising as f must have
 *    (causalDielectric): lower frequencies travel slower than the speed given,
 *    which is that at a stated reference frequency.
 *
 * A reflection is then the launch convolved with both, so it arrives at the
 * lossless delay but rises slowly and reads low for a while; edge-fit.ts fits
 * this shape instead of reading the edge's corners.
 */

const SPEED_OF_LIGHT = 299_792_458;

/** 20·log10(e): decibels per neper (definition of the neper). */
export const DB_PER_NEPER = 20 / Math.LN10;

/** Attenuation figure at one frequency, as the cable library keeps it. */
export interface LossPoint {
  dbPer100m: number;
  frequencyHz: number;
}

/**
 * α(f) = resistive + skin·√f + dielectric·f, nepers per metre (one way). The
 * resistive term is the conductors' DC resistance seen at high frequency
 * (α ≈ R/2Z0 once ωL ≫ R); below that frequency the same resistance makes the
 * line diffusive, which only the exact propagation (lineKernel) follows.
 */
export interface LossModel {
  skinNpPerMRootHz: number;
  dielectricNpPerMPerHz: number;
  resistiveNpPerM?: number;
}

export const NO_LOSS: LossModel = { skinNpPerMRootHz: 0, dielectricNpPerMPerHz: 0 };

const npPerM = (dbPer100m: number) => dbPer100m / 100 / DB_PER_NEPER;

/** Attenuation of the model at f, dB per 100 m. */
export function attenuationDbPer100m(model: LossModel, frequencyHz: number): number {
  const np = (model.resistiveNpPerM ?? 0) + model.skinNpPerMRootHz * Math.sqrt(frequencyHz) + model.dielectricNpPerMPerHz * frequencyHz;
  return np * 100 * DB_PER_NEPER;
}

/**
 * The model through attenuation points, by least squares on α in nepers
 * (each point weighted by 1/α, so each counts by its relative error) with every
 * term kept non-negative: the non-negative least squares of C. L. Lawson and
 * R. J. Hanson ("Solving Least Squares Problems", 1974, ch. 23), done here by
 * trying each set of terms and keeping the best feasible one. A third,
 * frequency-independent term r takes up the loss of the conductors' DC
 * resistance (α ≈ R/2Z0 once ωL ≫ R), so that low-frequency points do not pass
 * for skin loss.
 * One point cannot tell the terms apart: it is taken as skin loss, the larger
 * term in cables below a few hundred MHz.
 */
export function lossModelFromPoints(points: readonly LossPoint[]): LossModel {
  const pts = points.filter((p) => p.frequencyHz > 0 && p.dbPer100m >= 0 && Number.isFinite(p.dbPer100m));
  if (pts.length === 0) return NO_LOSS;
  const rows = pts.map((p) => {
    const a = npPerM(p.dbPer100m);
    const w = a > 0 ? 1 / a : 1;
    return { x: [w, Math.sqrt(p.frequencyHz) * w, p.frequencyHz * w], y: a * w };
  });
  if (pts.length === 1) return { skinNpPerMRootHz: solveSubset(rows, [1])?.[1] ?? 0, dielectricNpPerMPerHz: 0 };
  // Subsets of [r, s, g]; with two points at most two terms are determined.
  const subsets = pts.length >= 3 ? [[0, 1, 2], [1, 2], [0, 1], [0, 2], [1], [2], [0]] : [[1, 2], [0, 1], [1], [2]];
  let best: { coef: number[]; misfit: number } | null = null;
  for (const set of subsets) {
    const coef = solveSubset(rows, set);
    if (!coef || coef.some((c) => c < 0)) continue;
    const misfit = rows.reduce((acc, r) => acc + (r.x[0] * coef[0] + r.x[1] * coef[1] + r.x[2] * coef[2] - r.y) ** 2, 0);
    if (!best || misfit < best.misfit * (1 - 1e-9)) best = { coef, misfit };
  }
  return best ? { skinNpPerMRootHz: best.coef[1], dielectricNpPerMPerHz: best.coef[2], resistiveNpPerM: best.coef[0] } : NO_LOSS;
}

/**
 * One-way attenuation of the model from the exact propagation constant, nepers per metre:
 * α = Re √((2α_R + jω/v)(2α_G + jω/v)) with 2α_R = 2(r + s√f·(1 + j)) and 2α_G = 2g·f, the same
 * line exactLineKernel propagates (telegrapher's equations, Pozar §2.1). Where ωL ≫ R it is
 * r + s√f + g·f; where the conductors' resistance nears ωL (a thin pair below a few hundred kHz)
 * the line turns diffusive and its attenuation falls below that sum.
 */
export function exactAttenuationNpPerM(model: LossModel, frequencyHz: number, vf: number): number {
  const bi = (2 * Math.PI * frequencyHz) / (vf * SPEED_OF_LIGHT);
  const sk = model.skinNpPerMRootHz * Math.sqrt(frequencyHz);
  const ar = 2 * ((model.resistiveNpPerM ?? 0) + sk);
  const ai = 2 * sk + bi;
  const br = 2 * model.dielectricNpPerMPerHz * frequencyHz;
  const pr = ar * br - ai * bi;
  const pi = ar * bi + ai * br;
  return Math.sqrt(Math.max(0, (Math.hypot(pr, pi) + pr) / 2));
}

/**
 * The model through attenuation points with each point read through the exact propagation
 * (exactAttenuationNpPerM) instead of the sum r + s√f + g·f: starting from lossModelFromPoints,
 * the terms it kept are adjusted by damped Gauss–Newton steps on the points' relative errors
 * (the Levenberg–Marquardt method, D. W. Marquardt, J. SIAM 11 (1963) 431), each kept
 * non-negative. On a thin pair a point at 100 kHz lies where the line is already diffusive;
 * read as R/2Z0 it gives too small a DC resistance, and the edges and the incident step's creep
 * built from that model come out too fast. Two figures give the sum at most two terms; where those
 * two through the exact propagation cannot meet both figures with non-negative values (a line whose
 * DC resistance still counts at the lower figure: R is not small beside ωL there, and the exact
 * attenuation is no sum of the terms), the third term is freed as well and all three are fitted to
 * the two figures, starting from the sum's reading (the figures do not fix them uniquely; the fit
 * meets them with the terms nearest that reading). Returns the starting model when no step improves it, or when the result misses a figure
 * by more than 1 %.
 */
export function lossModelThroughLine(points: readonly LossPoint[], vf: number): LossModel {
  const start = lossModelFromPoints(points);
  const pts = points.filter((p) => p.frequencyHz > 0 && p.dbPer100m > 0 && Number.isFinite(p.dbPer100m));
  if (pts.length === 0 || !(vf > 0 && vf <= 1)) return start;
  return throughLine(pts, vf, start, false) ?? (pts.length < 3 ? throughLine(pts, vf, start, true) : null) ?? start;
}

/**
 * lossModelThroughLine's fit from `start`: every term free with three figures or more, or with
 * `freeAll`; otherwise only the terms `start` holds. Null where no step improves on `start` or the
 * result misses a figure by more than 1 %.
 */
function throughLine(pts: readonly LossPoint[], vf: number, start: LossModel, freeAll: boolean): LossModel | null {
  const toModel0 = (m: LossModel) => [m.resistiveNpPerM ?? 0, m.skinNpPerMRootHz, m.dielectricNpPerMPerHz];
  const toModel = (x: number[]): LossModel => ({ resistiveNpPerM: x[0], skinNpPerMRootHz: x[1], dielectricNpPerMPerHz: x[2] });
  const x0 = [start.resistiveNpPerM ?? 0, start.skinNpPerMRootHz, start.dielectricNpPerMPerHz];
  // With three points or more every term is free; a term the first fit set to zero starts at a
  // twentieth of the lowest point's attenuation (a relative step cannot leave zero).
  if (pts.length >= 3 || freeAll) {
    const fMin = Math.min(...pts.map((p) => p.frequencyHz));
    const aMin = Math.min(...pts.map((p) => npPerM(p.dbPer100m)));
    const seed = [aMin / 20, aMin / 20 / Math.sqrt(fMin), aMin / 20 / fMin];
    for (let j = 0; j < 3; j++) if (!(x0[j] > 0)) x0[j] = seed[j];
  }
  const free = [0, 1, 2].filter((j) => x0[j] > 0);
  if (free.length === 0) return null;
  const residuals = (x: number[]) => pts.map((p) => exactAttenuationNpPerM(toModel(x), p.frequencyHz, vf) / npPerM(p.dbPer100m) - 1);
  const cost = (x: number[]) => residuals(x).reduce((a, r) => a + r * r, 0);
  let x = x0;
  let c = cost(x);
  let lambda = 1e-3;
  for (let it = 0; it < 60 && c > 1e-14; it++) {
    const r = residuals(x);
    // Jacobian in each term's relative change (the terms differ by orders of magnitude).
    const J = pts.map(() => new Array<number>(free.length).fill(0));
    free.forEach((j, col) => {
      const xp = [...x];
      xp[j] = x[j] * (1 + 1e-6);
      const rp = residuals(xp);
      for (let i = 0; i < pts.length; i++) J[i][col] = (rp[i] - r[i]) / 1e-6;
    });
    let improved = false;
    for (let tries = 0; tries < 12 && !improved; tries++) {
      const k = free.length;
      const a = Array.from({ length: k }, () => new Array<number>(k + 1).fill(0));
      for (let i = 0; i < pts.length; i++)
        for (let p = 0; p < k; p++) {
          for (let q = 0; q < k; q++) a[p][q] += J[i][p] * J[i][q];
          a[p][k] -= J[i][p] * r[i];
        }
      for (let p = 0; p < k; p++) a[p][p] *= 1 + lambda;
      for (let p = 0; p < k; p++) a[p][p] += 1e-12;
      const step = solveDense(a);
      if (!step) break;
      // A relative step, at most halving or doubling a term at once, never below zero.
      const xn = [...x];
      free.forEach((j, col) => (xn[j] = x[j] * Math.exp(Math.max(-0.7, Math.min(0.7, step[col])))));
      const cn = cost(xn);
      if (cn < c) {
        x = xn;
        c = cn;
        lambda = Math.max(1e-9, lambda / 4);
        improved = true;
      } else lambda *= 8;
    }
    if (!improved) break;
  }
  // Kept only where it meets every figure (to 1 %): otherwise the terms the figures allow cannot
  // describe this line through the exact propagation, and the sum's reading stands.
  return c < cost(toModel0(start)) && residuals(x).every((r) => Math.abs(r) <= 0.01) ? toModel(x) : null;
}

/** Solves the k × (k + 1) augmented system in place by Gaussian elimination with partial pivoting; null when singular. */
function solveDense(a: number[][]): number[] | null {
  const k = a.length;
  for (let c = 0; c < k; c++) {
    let p = c;
    for (let i = c + 1; i < k; i++) if (Math.abs(a[i][c]) > Math.abs(a[p][c])) p = i;
    if (!(Math.abs(a[p][c]) > 1e-300)) return null;
    [a[c], a[p]] = [a[p], a[c]];
    for (let i = 0; i < k; i++) {
      if (i === c) continue;
      const f = a[i][c] / a[c][c];
      for (let j = c; j <= k; j++) a[i][j] -= f * a[c][j];
    }
  }
  return a.map((row, i) => row[k] / row[i]);
}

/** Least squares with only the terms in `set`; the others are 0. Null when singular. */
function solveSubset(rows: Array<{ x: number[]; y: number }>, set: number[]): number[] | null {
  const k = set.length;
  const a = Array.from({ length: k }, () => new Array<number>(k + 1).fill(0));
  for (const r of rows) {
    for (let i = 0; i < k; i++) {
      for (let j = 0; j < k; j++) a[i][j] += r.x[set[i]] * r.x[set[j]];
      a[i][k] += r.x[set[i]] * r.y;
    }
  }
  const x = solveDense(a);
  if (!x) return null;
  const coef = [0, 0, 0];
  set.forEach((term, i) => (coef[term] = x[i]));
  return coef;
}

/** Per-metre line constants with skin and dielectric terms, as the cable library keeps them. */
export interface LineConstants {
  rDcOhmPerM?: number | null;
  skinOhmPerMRootHz?: number | null;
  lHPerM?: number | null;
  cFPerM?: number | null;
  gSPerM?: number | null;
  lossTangent?: number | null;
}

/**
 * Attenuation of a line from its constants at frequency f: α = Re √((R + jωL')(G + jωC)),
 * with R = R_dc + k_s√f and the skin effect's internal reactance k_s√f added to ωL
 * (a good conductor's surface impedance R_s(1 + j), Pozar §1.7 and §2.7).
 * Returns dB per 100 m.
 */
export function attenuationFromLineConstants(lc: LineConstants, frequencyHz: number): number {
  const l = lc.lHPerM ?? 0;
  const c = lc.cFPerM ?? 0;
  const w = 2 * Math.PI * frequencyHz;
  const skin = (lc.skinOhmPerMRootHz ?? 0) * Math.sqrt(frequencyHz);
  const zRe = (lc.rDcOhmPerM ?? 0) + skin;
  const zIm = w * l + skin;
  const yRe = (lc.gSPerM ?? 0) + w * c * (lc.lossTangent ?? 0);
  const yIm = w * c;
  // γ² = Z·Y; α = Re √(γ²).
  const re = zRe * yRe - zIm * yIm;
  const im = zRe * yIm + zIm * yRe;
  return Math.sqrt((Math.hypot(re, im) + re) / 2) * DB_PER_NEPER * 100;
}

/** Skin parameter K (√s) of the erfc edge after a round trip of `twoWayM` metres. */
export function skinParameter(model: LossModel, twoWayM: number): number {
  return (twoWayM * model.skinNpPerMRootHz) / Math.sqrt(Math.PI);
}

/** Half-width c (s) of the dielectric spread after a round trip of `twoWayM` metres. */
export function dielectricSpread(model: LossModel, twoWayM: number): number {
  return (twoWayM * model.dielectricNpPerMPerHz) / (2 * Math.PI);
}

/**
 * erfc(x) with fractional error below 1.2e-7 everywhere (the Chebyshev-fitted
 * form of W. H. Press et al., "Numerical Recipes", 2nd ed., §6.2, erfcc).
 */
export function erfc(x: number): number {
  const z = Math.abs(x);
  const t = 1 / (1 + 0.5 * z);
  const r =
    t *
    Math.exp(
      -z * z -
        1.26551223 +
        t *
          (1.00002368 +
            t *
              (0.37409196 +
                t * (0.09678418 + t * (-0.18628806 + t * (0.27886807 + t * (-1.13520398 + t * (1.48851587 + t * (-0.82215223 + t * 0.17087277)))))))),
    );
  return x >= 0 ? r : 2 - r;
}

/** The skin-effect step response erfc(K / 2√t) at t seconds after the delay (0 before it). */
export function skinStep(k: number, tS: number): number {
  if (tS <= 0) return 0;
  if (k <= 0) return 1;
  return erfc(k / (2 * Math.sqrt(tS)));
}

/** The line's round-trip impulse response on a sample grid: values[i] is the weight at (i − offset)·dt. */
export interface LineKernel {
  values: Float64Array;
  offset: number;
}

/**
 * Weight of each sample cell [(i − ½)dt, (i + ½)dt] of the skin response (an
 * erfc difference) convolved with that of the dielectric spread (an arctan
 * difference, or the causal spread when a reference frequency is given), out to `spanSamples` after the delay or until less than 1e-4
 * of the step is left. The weights sum to the part of the response inside that
 * (less than 1 by the slow tail).
 */
export function lineKernel(model: LossModel, twoWayM: number, dtS: number, spanSamples: number, dielectricReferenceHz?: number): LineKernel {
  const k = skinParameter(model, twoWayM);
  const c = dielectricSpread(model, twoWayM);
  const span = Math.max(1, Math.ceil(spanSamples));
  // The response's cells until what is left of it falls under 1e-4 of the step.
  let last = span;
  for (let i = 0; i <= span; i++) {
    if (1 - skinStep(k, (i + 0.5) * dtS) < 1e-4) {
      last = i;
      break;
    }
  }
  const skin = new Float64Array(last + 1);
  for (let i = 0; i <= last; i++) skin[i] = skinStep(k, (i + 0.5) * dtS) - (i === 0 ? 0 : skinStep(k, (i - 0.5) * dtS));
  if (!(c > 0.02 * dtS)) return { values: skin, offset: 0 };
  // A Cauchy spread narrower than 2 % of a sample changes nothing worth the work.
  const half = Math.min(span, Math.ceil(Math.max(4, 50 * (c / dtS))));
  const diel = dielectricReferenceHz ? causalDielectric(c, dtS, half, dielectricReferenceHz) : cauchySpread(c, dtS, half);
  const values = new Float64Array(last + 1 + diel.values.length - 1);
  for (let i = 0; i <= last; i++) {
    const a = skin[i];
    if (a === 0) continue;
    for (let j = 0; j < diel.values.length; j++) values[i + j] += a * diel.values[j];
  }
  return { values, offset: diel.offset };
}

/** The zero-phase dielectric spread: Cauchy cell weights over ±half samples. */
function cauchySpread(c: number, dtS: number, half: number): LineKernel {
  const values = new Float64Array(2 * half + 1);
  for (let j = -half; j <= half; j++) values[j + half] = (Math.atan(((j + 0.5) * dtS) / c) - Math.atan(((j - 0.5) * dtS) / c)) / Math.PI;
  return { values, offset: half };
}

/**
 * The causal dielectric spread: |H| = exp(−c·|ω|) with the phase the Hilbert transform
 * gives it, φ(ω) = (2c/π)·ω·ln(ω/ω_ref), so that lower frequencies travel slower and the
 * speed given is that at ω_ref (the minimum-phase constant-Q response of W. I. Futterman,
 * J. Geophys. Res. 67 (1962) 5279; the same law as a constant loss tangent's wideband
 * permittivity, A. R. Djordjevic et al., IEEE Trans. EMC 43 (2001) 662). Samples −4 … post.
 */
function causalDielectric(c: number, dtS: number, post: number, referenceHz: number): LineKernel {
  const pre = 4;
  let n = 256;
  while (n < 4 * (pre + post) && n < 1 << 16) n <<= 1;
  const re = new Float64Array(n);
  const im = new Float64Array(n);
  const wRef = 2 * Math.PI * referenceHz;
  re[0] = 1;
  for (let k = 1; k <= n / 2; k++) {
    const w = (2 * Math.PI * k) / (n * dtS);
    const amp = Math.exp(-c * w);
    const ph = ((2 * c) / Math.PI) * w * Math.log(w / wRef);
    re[k] = amp * Math.cos(ph);
    im[k] = amp * Math.sin(ph);
    if (k < n / 2) {
      re[n - k] = re[k];
      im[n - k] = -im[k];
    } else im[k] = 0;
  }
  fft(re, im, true);
  const values = new Float64Array(pre + post + 1);
  for (let j = -pre; j <= post; j++) values[j + pre] = re[(j + n) % n];
  return { values, offset: pre };
}

/**
 * In-place radix-2 FFT of (re, im), length a power of two; `inverse` divides by
 * the length (J. W. Cooley and J. W. Tukey, "An algorithm for the machine
 * calculation of complex Fourier series", Math. Comp. 19 (1965) 297).
 */
export function fft(re: Float64Array, im: Float64Array, inverse = false): void {
  const n = re.length;
  for (let i = 1, j = 0; i < n; i++) {
    let bit = n >> 1;
    for (; j & bit; bit >>= 1) j ^= bit;
    j ^= bit;
    if (i < j) {
      const tr = re[i];
      re[i] = re[j];
      re[j] = tr;
      const ti = im[i];
      im[i] = im[j];
      im[j] = ti;
    }
  }
  for (let len = 2; len <= n; len <<= 1) {
    const ang = ((inverse ? 2 : -2) * Math.PI) / len;
    const wr = Math.cos(ang);
    const wi = Math.sin(ang);
    for (let i = 0; i < n; i += len) {
      let cr = 1;
      let ci = 0;
      for (let k = 0; k < len / 2; k++) {
        const a = i + k;
        const b = a + len / 2;
        const xr = re[b] * cr - im[b] * ci;
        const xi = re[b] * ci + im[b] * cr;
        re[b] = re[a] - xr;
        im[b] = im[a] - xi;
        re[a] += xr;
        im[a] += xi;
        const t = cr * wr - ci * wi;
        ci = cr * wi + ci * wr;
        cr = t;
      }
    }
  }
  if (inverse) for (let i = 0; i < n; i++) {
    re[i] /= n;
    im[i] /= n;
  }
}

/**
 * The round trip's response from the exact propagation constant, for a model with
 * a resistive term: with R = 2Z0·(r + s√f·(1 + j)) (DC and skin resistance with its
 * internal reactance), G = 2·g·f/Z0, L = Z0/v and C = 1/(Z0·v),
 * γ = √((R + jωL)(G + jωC)) = √((2α_R + jω/v)(2α_G + jω/v)), free of Z0; the kernel
 * is the inverse FFT of H = exp(−2d·(γ − jω/v)), the lossless delay taken out
 * (telegrapher's equations, Pozar §2.1 and §2.7). At high frequency it is the
 * skin edge attenuated by e^(−2d·r); at low frequency the line turns diffusive and
 * the response creeps up to its full height. The dielectric spread is the same
 * spread as lineKernel's (Cauchy, or causal about a reference frequency).
 * The reflection is taken as the port sees it, from a source of the cable's nominal
 * impedance: the wave launched is 2z/(1 + z) of the nominal one and the port passes
 * 2/(1 + z) of the wave coming back, z = Zc/Z0 = √((2α_R + p/v)/(p/v)) the line's own
 * impedance over its nominal one, so H carries 4z/(1 + z)²: at high frequency 1, at low
 * frequency, where a resistive line's impedance grows, less (the incident step's creep,
 * creep.ts, already holds that part of the level).
 * With `times` 'inputReflection' the response is H·ρ_in, ρ_in = (z − 1)/(z + 1): the part of a
 * resistive end's echo that its mismatch to the line's own impedance adds (edge-fit.ts, terminated ends).
 */
export function exactLineKernel(
  model: LossModel,
  twoWayM: number,
  dtS: number,
  spanSamples: number,
  vf: number,
  dielectricReferenceHz?: number,
  times: 'line' | 'inputReflection' = 'line',
): LineKernel {
  const span = Math.max(8, Math.ceil(spanSamples));
  let n = 256;
  while (n < 2 * span && n < 1 << 17) n <<= 1;
  const re = new Float64Array(n);
  const im = new Float64Array(n);
  const v = vf * SPEED_OF_LIGHT;
  const d = twoWayM / 2;
  const r = model.resistiveNpPerM ?? 0;
  // Evaluated along p = σ + jω and restored by e^(σt) afterwards (a damped transform): the slow
  // tail that would wrap round the period comes back weighed by e^(−σ·period) = 1e-4, and the
  // kernel's end, half a period on, is restored by e^(σ·period/2) = 100 at most.
  const period = n * dtS;
  const sigma = Math.log(1e4) / period;
  for (let k = 0; k <= n / 2; k++) {
    const w = (2 * Math.PI * k) / period;
    // √(p/π)·√π = √p, so s·√f·(1 + j) at p = jω is s·√(p/π); principal root.
    const pm = Math.sqrt(sigma * sigma + w * w);
    const sqr = model.skinNpPerMRootHz * Math.sqrt((pm + sigma) / 2 / Math.PI);
    const sqi = model.skinNpPerMRootHz * Math.sqrt(Math.max(0, (pm - sigma) / 2) / Math.PI);
    // (2α_R + p/v)·(p/v) with 2α_R = 2(r + s√(p/π)): the conductors' part, causal.
    const ar = 2 * (r + sqr) + sigma / v;
    const ai = 2 * sqi + w / v;
    const br = sigma / v;
    const bi = w / v;
    const pr = ar * br - ai * bi;
    const pi = ar * bi + ai * br;
    const mag = Math.sqrt(pr * pr + pi * pi);
    const gr = Math.sqrt(Math.max(0, (mag + pr) / 2));
    const gi = (pi < 0 ? -1 : 1) * Math.sqrt(Math.max(0, (mag - pr) / 2));
    // H = exp(−2d(γ − p/v)), the lossless delay taken out.
    const amp = Math.exp(-2 * d * (gr - sigma / v));
    const ph = -2 * d * (gi - w / v);
    re[k] = amp * Math.cos(ph);
    im[k] = amp * Math.sin(ph);
    const [fr, fi] = portFactor(ar, ai, br, bi);
    const h0 = re[k];
    re[k] = h0 * fr - im[k] * fi;
    im[k] = h0 * fi + im[k] * fr;
    if (times === 'inputReflection') {
      const [qr, qi] = inputReflection(ar, ai, br, bi);
      const h1 = re[k];
      re[k] = h1 * qr - im[k] * qi;
      im[k] = h1 * qi + im[k] * qr;
    }
    if (k > 0 && k < n / 2) {
      re[n - k] = re[k];
      im[n - k] = -im[k];
    }
  }
  fft(re, im, true);
  const conductors = new Float64Array(span + 1);
  for (let i = 0; i <= span; i++) conductors[i] = re[i] * Math.exp(sigma * i * dtS);
  const c = dielectricSpread(model, twoWayM);
  if (!(c > 0.02 * dtS)) return { values: conductors, offset: 0 };
  const half = Math.min(span, Math.ceil(Math.max(4, 50 * (c / dtS))));
  const diel = dielectricReferenceHz ? causalDielectric(c, dtS, half, dielectricReferenceHz) : cauchySpread(c, dtS, half);
  const values = new Float64Array(span + diel.values.length);
  for (let i = 0; i <= span; i++) {
    const a = conductors[i];
    if (a === 0) continue;
    for (let j = 0; j < diel.values.length; j++) values[i + j] += a * diel.values[j];
  }
  return { values, offset: diel.offset };
}

/** z = Zc/Z0 with z² = (ar + j·ai)/(br + j·bi), principal root (see exactLineKernel). */
function impedanceRatio(ar: number, ai: number, br: number, bi: number): [number, number] {
  const den = br * br + bi * bi;
  const z2r = (ar * br + ai * bi) / den;
  const z2i = (ai * br - ar * bi) / den;
  const zm = Math.sqrt(z2r * z2r + z2i * z2i);
  const zr = Math.sqrt(Math.max(0, (zm + z2r) / 2));
  const zi = (z2i < 0 ? -1 : 1) * Math.sqrt(Math.max(0, (zm - z2r) / 2));
  return [zr, zi];
}

/** The line's input reflection against its nominal impedance, ρ_in = (z − 1)/(z + 1) (creep.ts, loss-estimate.ts). */
function inputReflection(ar: number, ai: number, br: number, bi: number): [number, number] {
  const [zr, zi] = impedanceRatio(ar, ai, br, bi);
  const dr = zr + 1;
  const dd = dr * dr + zi * zi;
  return [((zr - 1) * dr + zi * zi) / dd, (zi * dr - (zr - 1) * zi) / dd];
}

/** The port's factor 4z/(1 + z)² with z² = (ar + j·ai)/(br + j·bi), principal root (see exactLineKernel). */
function portFactor(ar: number, ai: number, br: number, bi: number): [number, number] {
  const [zr, zi] = impedanceRatio(ar, ai, br, bi);
  // 4z/(1 + z)².
  const ur = (1 + zr) * (1 + zr) - zi * zi;
  const ui = 2 * (1 + zr) * zi;
  const ud = ur * ur + ui * ui;
  return [(4 * (zr * ur + zi * ui)) / ud, (4 * (zi * ur - zr * ui)) / ud];
}

/**
 * The same loss taken with zero phase: the impulse response whose spectrum is
 * |H| = exp(−2d·(r + s·√f + g·f)) with no phase at all, even about the delay.
 * No cable behaves so (its loss and its phase go together, as the causal
 * kernels above have it), but a record computed from a loss model that left
 * the phase out, or filtered forwards and backwards, shows edges symmetric
 * about their middle: there the arrival is the edge's middle, not its foot.
 * The edge fit tries this shape beside the causal one and keeps the better fit.
 */
export function zeroPhaseLineKernel(model: LossModel, twoWayM: number, dtS: number, spanSamples: number): LineKernel {
  const half = Math.max(8, Math.ceil(spanSamples));
  let n = 256;
  while (n < 4 * half && n < 1 << 17) n <<= 1;
  const re = new Float64Array(n);
  const im = new Float64Array(n);
  const r = model.resistiveNpPerM ?? 0;
  for (let k = 0; k <= n / 2; k++) {
    const f = k / (n * dtS);
    const amp = Math.exp(-twoWayM * (r + model.skinNpPerMRootHz * Math.sqrt(f) + model.dielectricNpPerMPerHz * f));
    re[k] = amp;
    if (k > 0 && k < n / 2) re[n - k] = amp;
  }
  fft(re, im, true);
  const h = Math.min(half, n / 2 - 1);
  const values = new Float64Array(2 * h + 1);
  for (let j = -h; j <= h; j++) values[j + h] = re[(j + n) % n];
  return { values, offset: h };
}
