/**
 * A cable's loss read from the trace itself, when the cable library has none:
 * from the slow rise of the incident step along a line with series loss.
 *
 * Each short length dx of a line whose conductors have series resistance R
 * reflects a part R·dx/2Z0 of the wave, so a step launched into a long lossy
 * line does not stay flat: the level creeps up as the wave travels out and
 * the reflections of every metre come back. For the line as a whole this is
 * the input impedance of a long line, Zc = √((R + jωL)/(jωC)), that grows at
 * low frequency; with R = 2Z0·(r + s·√f·(1 + j)) (DC and skin-effect
 * resistance with its equal internal reactance, nepers per metre as loss.ts
 * keeps them) and L = Z0/v, C = 1/(Z0·v):
 *
 *   Zc/Z0 = √(1 + 2v·(r + s·√f·(1 + j))/(jω)),   ρ_in(ω) = (Zc − Z0)/(Zc + Z0)
 *
 * (telegrapher's equations, D. M. Pozar, "Microwave Engineering", 4th ed.,
 * §2.1 and §2.7). Early on the step reads ρ_in(t) ≈ s·v·√t/π + r·v·t/2: a
 * square-root rise from the skin effect and a straight one from the DC
 * resistance, both before any reflection comes back. The r and s that make
 * the exact step response (the inverse transform of ρ_in) follow the stretch
 * of trace between the launch and the first event are the estimate; they fix
 * both the height the far reflections lost and the shape of their edges.
 */
import { fft, type LossModel } from './loss';

const SPEED_OF_LIGHT = 299_792_458;

/** Points the stretch is reduced to (block means), and the transform's length. */
const FIT_POINTS = 160;
const FFT_POINTS = 512;

export interface IncidentInput {
  /** The working signal of a step record, in ρ. */
  y: Float64Array;
  /** Sample interval, seconds. */
  dt: number;
  /** Sample of the launch's arrival at the cable (time zero of the response). */
  t0Idx: number;
  /** The clean stretch [from, to) between the launch's settling and the first event. */
  from: number;
  to: number;
  vf: number;
}

export interface IncidentEstimate {
  model: LossModel;
  /** Residual sums of squares: the level alone, and the fitted loss. */
  ssFlat: number;
  ssFit: number;
  points: number;
}

/**
 * The exact step response ρ_in(t) of a long line with series loss (r, s), at the
 * times `ts` (seconds after the launch). In the Laplace variable p the skin
 * term s·√f·(1 + j) is s·√(p/π), so ρ_in(p) = (ζ − 1)/(ζ + 1) with
 * ζ = √(1 + 2v·(r + s·√(p/π))/p); the step ρ_in(p)/p is inverted by an FFT
 * along the line p = σ + jω (a damped Fourier transform: the slowly settling
 * response that would wrap round the FFT's period is weighed down by e^(−σt)
 * and restored afterwards; J. W. Cooley, P. A. W. Lewis and P. D. Welch,
 * "The fast Fourier transform algorithm: programming considerations in the
 * calculation of sine, cosine and Laplace transforms", J. Sound Vib. 12 (1970) 315).
 */
export function incidentStep(r: number, s: number, vf: number, ts: readonly number[]): number[] {
  let tMax = 1e-15;
  for (const t of ts) if (t > tMax) tMax = t;
  const n = FFT_POINTS;
  const period = 4 * tMax;
  const dtc = period / n;
  // Wrapped parts come back weighed by e^(−σ·period) = 1e-4; late times are restored by e^(σt) ≤ 10.
  const sigma = Math.log(1e4) / period;
  const v = vf * SPEED_OF_LIGHT;
  const re = new Float64Array(n);
  const im = new Float64Array(n);
  for (let k = 0; k <= n / 2; k++) {
    const w = (2 * Math.PI * k) / period;
    // √(p/π), principal root, p = σ + jω.
    const pm = Math.sqrt(sigma * sigma + w * w);
    const sqr = Math.sqrt((pm + sigma) / 2 / Math.PI);
    const sqi = Math.sqrt(Math.max(0, (pm - sigma) / 2) / Math.PI);
    // X = 2v(r + s·√(p/π))/p.
    const nr = 2 * v * (r + s * sqr);
    const ni = 2 * v * s * sqi;
    const den = sigma * sigma + w * w;
    const xr = 1 + (nr * sigma + ni * w) / den;
    const xi = (ni * sigma - nr * w) / den;
    const mag = Math.sqrt(xr * xr + xi * xi);
    const zr = Math.sqrt((mag + xr) / 2);
    const zi = (xi < 0 ? -1 : 1) * Math.sqrt(Math.max(0, (mag - xr) / 2));
    // ρ = (ζ − 1)/(ζ + 1), then divided by p.
    const ar = zr - 1;
    const br = zr + 1;
    const dd = br * br + zi * zi;
    const rr = (ar * br + zi * zi) / dd;
    const ri = (zi * br - ar * zi) / dd;
    const gr = (rr * sigma + ri * w) / den;
    const gi = (ri * sigma - rr * w) / den;
    re[k] = gr;
    im[k] = gi;
    if (k > 0 && k < n / 2) {
      re[n - k] = gr;
      im[n - k] = -gi;
    }
  }
  fft(re, im, true);
  return ts.map((t) => {
    if (t <= 0) return 0;
    const x = t / dtc;
    const i = Math.floor(x);
    if (i + 1 >= n) return 0;
    const f = x - i;
    const g = re[i] + f * (re[i + 1] - re[i]);
    return (g / dtc) * Math.exp(sigma * t);
  });
}

/** Residual sum of squares of y ≈ c + model, with the level c solved exactly. */
function levelMisfit(y: readonly number[], model: readonly number[]): number {
  let mean = 0;
  for (let k = 0; k < y.length; k++) mean += y[k] - model[k];
  mean /= y.length;
  let ss = 0;
  for (let k = 0; k < y.length; k++) ss += (y[k] - model[k] - mean) ** 2;
  return ss;
}

/**
 * Series loss (r, s) from the stretch of trace before the first event, or null
 * when the stretch is too short. The search starts from the two straight-line
 * terms (a linear least squares on √t and t) and is refined on the exact response
 * by the simplex method (J. A. Nelder and R. Mead, Computer Journal 7 (1965) 308).
 */
export function estimateFromIncident(x: IncidentInput): IncidentEstimate | null {
  const from = Math.max(0, Math.ceil(x.from));
  const to = Math.min(x.y.length, Math.floor(x.to));
  if (to - from < 24 || !(x.vf > 0) || !(x.dt > 0)) return null;
  const q = Math.max(1, Math.ceil((to - from) / FIT_POINTS));
  const ys: number[] = [];
  const ts: number[] = [];
  for (let a = from; a + q <= to; a += q) {
    let acc = 0;
    for (let i = a; i < a + q; i++) acc += x.y[i];
    ys.push(acc / q);
    ts.push((a + (q - 1) / 2 - x.t0Idx) * x.dt);
  }
  if (ys.length < 12 || !(ts[0] > 0)) return null;
  const v = x.vf * SPEED_OF_LIGHT;
  // The level after the launch is the normalisation's, so it is free.
  const ssAt = (r: number, s: number) => (r < 0 || s < 0 ? Infinity : levelMisfit(ys, incidentStep(r, s, x.vf, ts)));
  // First guess: y ≈ c + A·√t + B·t, A = s·v/π, B = r·v/2.
  const guess = linearGuess(ys, ts.map((t): [number, number] => [Math.sqrt(t), t]));
  const r0 = Math.max(0, (2 * guess[1]) / v);
  const s0 = Math.max(0, (guess[0] * Math.PI) / v);
  const ssFlat = levelMisfit(ys, ys.map(() => 0));
  // Scales of the simplex: the guess, or the loss of a common telecom pair where the guess is nil.
  const rScale = Math.max(r0, 1e-4);
  const sScale = Math.max(s0, 2e-7);
  const best = nelderMead((p) => ssAt(p[0] * rScale, p[1] * sScale), [r0 / rScale, s0 / sScale], 0.5, 60, 1e-4);
  const r = best.x[0] * rScale;
  const s = best.x[1] * sScale;
  return { model: { skinNpPerMRootHz: s, dielectricNpPerMPerHz: 0, resistiveNpPerM: r }, ssFlat, ssFit: best.fx, points: ys.length };
}

/** Least squares of y on [1, b0, b1]: the coefficients of b0 and b1. */
function linearGuess(y: readonly number[], b: ReadonlyArray<[number, number]>): [number, number] {
  const n = y.length;
  const m = [
    [0, 0, 0, 0],
    [0, 0, 0, 0],
    [0, 0, 0, 0],
  ];
  for (let k = 0; k < n; k++) {
    const row = [1, b[k][0], b[k][1]];
    for (let i = 0; i < 3; i++) {
      for (let j = 0; j < 3; j++) m[i][j] += row[i] * row[j];
      m[i][3] += row[i] * y[k];
    }
  }
  for (let c = 0; c < 3; c++) {
    let p = c;
    for (let i = c + 1; i < 3; i++) if (Math.abs(m[i][c]) > Math.abs(m[p][c])) p = i;
    if (!(Math.abs(m[p][c]) > 1e-300)) return [0, 0];
    [m[c], m[p]] = [m[p], m[c]];
    for (let i = 0; i < 3; i++) {
      if (i === c) continue;
      const f = m[i][c] / m[c][c];
      for (let j = c; j < 4; j++) m[i][j] -= f * m[c][j];
    }
  }
  return [m[1][3] / m[1][1], m[2][3] / m[2][2]];
}

/** Nelder–Mead simplex minimum of f near x0, first steps of `step`, at most `maxEval` evaluations, until the simplex's values agree to `tol` relative. */
export function nelderMead(f: (p: number[]) => number, x0: number[], step: number, maxEval: number, tol = 1e-9): { x: number[]; fx: number } {
  const dim = x0.length;
  let pts = [x0.slice()];
  for (let i = 0; i < dim; i++) {
    const p = x0.slice();
    p[i] += step * (Math.abs(p[i]) > 0.1 ? p[i] : 1);
    pts.push(p);
  }
  let vals = pts.map(f);
  let evals = pts.length;
  while (evals < maxEval) {
    const order = vals.map((_, i) => i).sort((a, b) => vals[a] - vals[b]);
    pts = order.map((i) => pts[i]);
    vals = order.map((i) => vals[i]);
    if (Math.abs(vals[dim] - vals[0]) <= tol * Math.abs(vals[0]) + 1e-300) break;
    const centroid = new Array<number>(dim).fill(0);
    for (let i = 0; i < dim; i++) for (let j = 0; j < dim; j++) centroid[j] += pts[i][j] / dim;
    const along = (t: number) => centroid.map((c, j) => c + t * (pts[dim][j] - c));
    const xr = along(-1);
    const fr = f(xr);
    evals++;
    if (fr < vals[0]) {
      const xe = along(-2);
      const fe = f(xe);
      evals++;
      if (fe < fr) [pts[dim], vals[dim]] = [xe, fe];
      else [pts[dim], vals[dim]] = [xr, fr];
    } else if (fr < vals[dim - 1]) {
      [pts[dim], vals[dim]] = [xr, fr];
    } else {
      const xc = fr < vals[dim] ? along(-0.5) : along(0.5);
      const fc = f(xc);
      evals++;
      if (fc < Math.min(fr, vals[dim])) [pts[dim], vals[dim]] = [xc, fc];
      else {
        for (let i = 1; i <= dim; i++) {
          pts[i] = pts[i].map((p, j) => pts[0][j] + 0.5 * (p - pts[0][j]));
          vals[i] = f(pts[i]);
          evals++;
        }
      }
    }
  }
  let b = 0;
  for (let i = 1; i < vals.length; i++) if (vals[i] < vals[b]) b = i;
  return { x: pts[b], fx: vals[b] };
}
