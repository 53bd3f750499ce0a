/**
 * Causal, passive pole fits of the two frequency-dependent losses of a cable,
 * so that a time-domain solver can carry them as a few first-order states per
 * cell (recursive convolution: R. Luebbers, F. Hunsberger, K. Kunz,
 * R. Standler, M. Schneider, "A frequency-dependent finite-difference
 * time-domain formulation for dispersive materials", IEEE Trans. EMC 32
 * (1990) 222).
 *
 * Conductor (skin effect). The internal series impedance per metre is
 *   Z_int(s) = Rdc·√(1 + s/a),  a = π·Rdc²/Rs²,
 * which is Rdc at DC and Rs·√f·(1 + j) well above f = a/2π, the surface
 * impedance of a good conductor (S. Ramo, J. R. Whinnery, T. Van Duzer,
 * "Fields and Waves in Communication Electronics", 3rd ed., §5.6). It is a
 * Stieltjes function:
 *   √(s + a) − √a = (1/π) ∫_a^∞ √(p − a)/p · s/(s + p) dp,
 * so a quadrature of that integral on a geometric grid of p gives a sum of
 * parallel R–L sections, each Rk·s/(s + pk) with Rk > 0: passive and causal by
 * construction. The part of the integral above the highest pole is, to first
 * order, a series inductance and is added as one.
 *
 * Dielectric. The wideband Debye model of A. R. Djordjevic, R. M. Biljić,
 * V. D. Likar-Smiljanić and T. K. Sarkar ("Wideband frequency-domain
 * characterization of FR-4 and time-domain causality", IEEE Trans. EMC 43
 * (2001) 662) is a uniform spread of Debye relaxations over log-frequency
 * between ω1 and ω2; it keeps tan δ nearly constant across that band. Sampling
 * the spread at one relaxation per decade gives shunt series R–C branches
 * (capacitance Ck, time constant τk = 1/pk) beside the high-frequency
 * capacitance C∞.
 */

export interface PoleSet {
  /** Pole frequencies pk in rad/s. */
  poles: number[];
  /** Weight of each pole: Ω/m (skin) or F/m (dielectric). */
  weights: number[];
}

export interface SkinFit extends PoleSet {
  /** DC resistance per metre that stays in series. */
  r0OhmPerM: number;
  /** Extra series inductance per metre standing for the quadrature's tail above the top pole. */
  tailHPerM: number;
}

/** Quadrature step in ln p: 1.25 points per decade (ripple in R(f) under 1 %). */
const H = Math.log(10) / 1.25;

/**
 * Skin-effect impedance as R0 + Σ Rk·s/(s + pk) + s·Ltail.
 * `rsOhmPerMRootHz` is Rs with R(f) → Rs·√f at high frequency; `omegaMax` the
 * highest angular frequency the solver must represent.
 */
export function fitSkin(rdcOhmPerM: number, rsOhmPerMRootHz: number, omegaMax: number, omegaMin: number): SkinFit {
  if (rsOhmPerMRootHz <= 0) return { r0OhmPerM: rdcOhmPerM, tailHPerM: 0, poles: [], weights: [] };
  const k = rsOhmPerMRootHz / Math.sqrt(Math.PI); // Z_int → K·√s, Re K√(jω) = Rs√f
  const a = rdcOhmPerM > 0 ? (Math.PI * rdcOhmPerM * rdcOhmPerM) / (rsOhmPerMRootHz * rsOhmPerMRootHz) : 0;
  // Variable u with p = a + e^u; integrand (K/π)·e^{3u/2}/(a + e^u) · s/(s + p) du.
  const uTop = Math.log(3 * omegaMax);
  // With a > 0 the terms below e^u = a/10 all have p ≈ a and are gathered into one pole, so the
  // quadrature can run far down at no cost. Without DC resistance, terms below ω_min/30 act on
  // times longer than any record and are folded into a resistance below.
  const uBottom = a > 0 ? Math.log(a * 1e-3) : Math.log(Math.max(omegaMin / 30, 1));
  const poles: number[] = [];
  const weights: number[] = [];
  let r0 = rdcOhmPerM;
  // Terms whose pole sits near a all share p ≈ a; gather them into one.
  let lumpW = 0;
  for (let u = uTop - H / 2; u > uBottom; u -= H) {
    const eu = Math.exp(u);
    const w = (((k / Math.PI) * Math.exp(1.5 * u)) / (a + eu)) * H;
    if (a > 0 && eu < a / 10) lumpW += w;
    else {
      poles.push(a + eu);
      weights.push(w);
    }
  }
  if (lumpW > 0) {
    poles.push(a * 1.05);
    weights.push(lumpW);
  }
  // A pole far below the lowest frequency of the record acts as a plain resistance over the
  // record (R·s/(s + p) → R for |s| ≫ p); carry it as one and save a state per cell.
  for (let i = poles.length - 1; i >= 0; i--) {
    if (poles[i] < omegaMin / 20) {
      r0 += weights[i];
      poles.splice(i, 1);
      weights.splice(i, 1);
    }
  }
  if (a === 0) {
    // Below the bottom pole: ∫ e^{u/2} du = 2√p_bottom, seen as a resistance at record frequencies.
    r0 += (k / Math.PI) * 2 * Math.sqrt(Math.exp(uBottom));
  }
  // Tail above the top pole: s/(s+p) ≈ s/p for p ≫ |s|; ∫ e^{3u/2}/(a+e^u) · e^{-u} du → 2 e^{-u/2}.
  const pTop = Math.exp(uTop);
  const tail = ((k / Math.PI) * 2) / Math.sqrt(pTop);
  return { r0OhmPerM: r0, tailHPerM: tail, poles, weights };
}

/** Internal impedance per metre of a fit at angular frequency ω, for checking and for loss figures. */
export function skinImpedance(fit: SkinFit, omega: number): [number, number] {
  let re = fit.r0OhmPerM;
  let im = omega * fit.tailHPerM;
  for (let i = 0; i < fit.poles.length; i++) {
    // R·jω/(jω + p) = R·(ω² + jωp)/(ω² + p²)
    const p = fit.poles[i];
    const d = omega * omega + p * p;
    re += (fit.weights[i] * omega * omega) / d;
    im += (fit.weights[i] * omega * p) / d;
  }
  return [re, im];
}

/** The exact target Rdc·√(1 + jω/a) (or K√(jω) without DC resistance). */
export function skinImpedanceExact(rdcOhmPerM: number, rsOhmPerMRootHz: number, omega: number): [number, number] {
  if (rsOhmPerMRootHz <= 0) return [rdcOhmPerM, 0];
  const k = rsOhmPerMRootHz / Math.sqrt(Math.PI);
  if (rdcOhmPerM <= 0) {
    const m = k * Math.sqrt(omega / 2);
    return [m, m];
  }
  const a = (Math.PI * rdcOhmPerM * rdcOhmPerM) / (rsOhmPerMRootHz * rsOhmPerMRootHz);
  // √(1 + jx)
  const x = omega / a;
  const r = Math.hypot(1, x);
  const re = Math.sqrt((r + 1) / 2);
  const im = Math.sqrt((r - 1) / 2);
  return [rdcOhmPerM * re, rdcOhmPerM * im];
}

/**
 * Wideband Debye dielectric: shunt admittance per metre
 *   Y(s) = s·C∞ + Σ s·Ck/(1 + s/pk)
 * with tan δ ≈ `tanDelta` between ω1 and ω2. C∞ is the high-frequency
 * capacitance, which sets the nominal velocity factor and impedance.
 */
export function fitDielectric(cInfFPerM: number, tanDelta: number, omega1: number, omega2: number): PoleSet {
  if (tanDelta <= 0 || omega2 <= omega1) return { poles: [], weights: [] };
  const decades = Math.log10(omega2 / omega1);
  // ε'' of the spread is (π/2)·Δε/((m2 − m1)·ln 10) in the band; ε' ≈ ε∞.
  const dC = (cInfFPerM * tanDelta * decades * Math.LN10 * 2) / Math.PI;
  const n = Math.max(1, Math.round(decades));
  const poles: number[] = [];
  const weights: number[] = [];
  const lo = Math.log(omega1);
  const step = Math.log(omega2 / omega1) / n;
  for (let i = 0; i < n; i++) {
    poles.push(Math.exp(lo + (i + 0.5) * step));
    weights.push(dC / n);
  }
  return { poles, weights };
}

/** Shunt admittance per metre of a dielectric fit plus C∞ and G at angular frequency ω. */
export function dielectricAdmittance(cInf: number, gSPerM: number, fit: PoleSet, omega: number): [number, number] {
  let re = gSPerM;
  let im = omega * cInf;
  for (let i = 0; i < fit.poles.length; i++) {
    // jωC/(1 + jω/p) = C·(ω²/p + jω)/(1 + ω²/p²)
    const p = fit.poles[i];
    const d = 1 + (omega * omega) / (p * p);
    re += (fit.weights[i] * omega * omega) / p / d;
    im += (fit.weights[i] * omega) / d;
  }
  return [re, im];
}
