/**
 * Time-domain simulation of a cable network by finite differences of the
 * telegrapher's equations
 *   ∂V/∂z = −(R + L ∂/∂t) I,   ∂I/∂z = −(G + C ∂/∂t) V,
 * on a staggered grid in space and time: voltages at cell boundaries (nodes)
 * at whole time steps, currents at cell centres (branches) at half steps, the
 * leapfrog scheme of K. S. Yee (IEEE Trans. Antennas Propag. 14 (1966) 302)
 * in one dimension, as applied to transmission lines by C. R. Paul
 * ("Analysis of Multiconductor Transmission Lines", 2nd ed., Wiley 2008,
 * ch. 8: the FDTD method).
 *
 * Every section is cut into cells no shorter than v·Δt, so the Courant number
 * v·Δt/Δz is at most 1 in every cell; with Δz = v·Δt exactly, a lossless
 * uniform section propagates without numerical dispersion.
 *
 * Frequency-dependent losses ride on each cell as first-order states (see
 * ./fit.ts): skin effect as parallel R–L sections in series with each
 * branch, dielectric loss as series R–C branches at each node, both updated by
 * recursive convolution with the exact exponential of each pole. Distributed
 * resistance and the loss states are averaged over the step (trapezoid);
 * lumped resistors (faults, source, loads) are taken implicitly at the new
 * time (backward Euler), which stays free of ringing however small the
 * resistor is.
 *
 * The network is a set of nodes joined by uniform line sections, with lumped
 * shunt resistors and capacitors at nodes and lumped series resistors or
 * inductors straddling a node (half in the cell on each side, so the element
 * acts at the node's position). Node 0 is the instrument port, driven by a
 * Thevenin source (open-circuit voltage vs(t) behind `sourceOhm`).
 */
import { dielectricAdmittance, fitDielectric, fitSkin, type PoleSet, type SkinFit, skinImpedance } from './fit';

export const C0 = 299_792_458;

export interface CableRlgc {
  /** High-frequency characteristic impedance √(L/C∞). */
  z0Ohm: number;
  /** High-frequency velocity factor 1/(c·√(L·C∞)). */
  vf: number;
  /** DC resistance of the loop (both conductors), Ω/m. */
  rdcOhmPerM: number;
  /** Skin-effect loop resistance: R(f) → Rs·√f well above the DC region, Ω/(m·√Hz). */
  skinOhmPerMRootHz: number;
  /** Dielectric loss tangent, nearly constant over the simulated band. */
  tanDelta: number;
  /** DC leakage conductance, S/m (wet insulation). */
  gSPerM?: number;
}

export interface LineSection {
  a: number;
  b: number;
  lengthM: number;
  cable: CableRlgc;
}

export interface FdtdNetwork {
  nodeCount: number;
  lines: LineSection[];
  /** Resistor from the node to the return conductor; 0 is a dead short. */
  shunts: Array<{ node: number; rOhm: number }>;
  /** Resistor in series with the line at a node that joins exactly two sections. */
  series: Array<{ node: number; rOhm: number }>;
  /** Capacitor from the node to the return conductor. */
  caps: Array<{ node: number; cF: number }>;
  /** Inductor in series with the line at a node that joins exactly two sections. */
  inductors: Array<{ node: number; lH: number }>;
}

export interface FdtdSettings {
  dtS: number;
  steps: number;
  sourceOhm: number;
  /** Open-circuit source voltage at time t (seconds); called once per step. */
  source: (tS: number) => number;
  /** Lowest angular frequency that matters (about 2π / record length). */
  omegaMin: number;
}

/** Shortest section the grid can hold as a line at this time step. */
export function minSectionM(cable: CableRlgc, dtS: number): number {
  return cable.vf * C0 * dtS;
}

interface Grid {
  nodes: number;
  branches: number;
  na: Int32Array;
  nb: Int32Array;
  lH: Float64Array;
  rCn: Float64Array;
  rBe: Float64Array;
  /** Skin poles per branch, padded to `skinPoles`. */
  skinPoles: number;
  skinA: Float64Array;
  skinBeta: Float64Array;
  cF: Float64Array;
  gS: Float64Array;
  fixed: Uint8Array;
  dielPoles: number;
  dielB: Float64Array;
  dielC: Float64Array;
}

function buildGrid(net: FdtdNetwork, dt: number, omegaMin: number): Grid {
  const omegaMax = 2 / dt;
  // Dielectric relaxations over the band the run can show, shared by all cables.
  const dielBand: [number, number] = [Math.max(omegaMin / 3, 1), omegaMax * 3];
  const lossyDielectric = net.lines.some((l) => l.cable.tanDelta > 0);
  const diel: PoleSet = lossyDielectric ? fitDielectric(1, 1, ...dielBand) : { poles: [], weights: [] };
  const dielPoles = diel.poles.length;
  const skinCache = new Map<CableRlgc, SkinFit>();
  const skinOf = (c: CableRlgc) => {
    let f = skinCache.get(c);
    if (!f) {
      f = fitSkin(c.rdcOhmPerM, c.skinOhmPerMRootHz, omegaMax, omegaMin);
      skinCache.set(c, f);
    }
    return f;
  };
  let skinPoles = 0;
  let nodes = net.nodeCount;
  let branches = 0;
  const cells = net.lines.map((ln) => {
    const v = ln.cable.vf * C0;
    const n = Math.floor(ln.lengthM / (v * dt) + 1e-9);
    if (n < 1) throw new Error(`section of ${ln.lengthM} m is shorter than one cell (${(v * dt).toFixed(4)} m)`);
    skinPoles = Math.max(skinPoles, skinOf(ln.cable).poles.length);
    branches += n;
    nodes += n - 1;
    return n;
  });
  const g: Grid = {
    nodes,
    branches,
    na: new Int32Array(branches),
    nb: new Int32Array(branches),
    lH: new Float64Array(branches),
    rCn: new Float64Array(branches),
    rBe: new Float64Array(branches),
    skinPoles,
    skinA: new Float64Array(branches * skinPoles),
    skinBeta: new Float64Array(branches * skinPoles),
    cF: new Float64Array(nodes),
    gS: new Float64Array(nodes),
    fixed: new Uint8Array(nodes),
    dielPoles,
    dielB: new Float64Array(dielPoles),
    dielC: new Float64Array(nodes * dielPoles),
  };
  for (let k = 0; k < dielPoles; k++) g.dielB[k] = Math.exp(-diel.poles[k] * dt);
  // Branches touching each original node, for straddling series elements.
  const touching: number[][] = Array.from({ length: net.nodeCount }, () => []);
  let nextNode = net.nodeCount;
  let b = 0;
  net.lines.forEach((ln, li) => {
    const n = cells[li];
    const dz = ln.lengthM / n;
    const c = ln.cable;
    const v = c.vf * C0;
    const L = c.z0Ohm / v;
    const Cinf = 1 / (c.z0Ohm * v);
    const skin = skinOf(c);
    const dCell = fitDielectric(Cinf, c.tanDelta, ...dielBand);
    let prev = ln.a;
    for (let i = 0; i < n; i++) {
      const next = i === n - 1 ? ln.b : nextNode++;
      g.na[b] = prev;
      g.nb[b] = next;
      g.lH[b] = (L + skin.tailHPerM) * dz;
      g.rCn[b] = skin.r0OhmPerM * dz;
      for (let k = 0; k < skin.poles.length; k++) {
        const a = Math.exp(-skin.poles[k] * dt);
        g.skinA[b * skinPoles + k] = a;
        g.skinBeta[b * skinPoles + k] = (skin.weights[k] * dz * (1 + a)) / 2;
      }
      for (const nd of [prev, next]) {
        g.cF[nd] += (Cinf * dz) / 2;
        g.gS[nd] += ((c.gSPerM ?? 0) * dz) / 2;
        for (let k = 0; k < dCell.poles.length; k++) g.dielC[nd * dielPoles + k] += (dCell.weights[k] * dz) / 2;
      }
      if (i === 0 && ln.a < net.nodeCount) touching[ln.a].push(b);
      if (i === n - 1 && ln.b < net.nodeCount) touching[ln.b].push(b);
      prev = next;
      b++;
    }
  });
  const straddle = (node: number, what: string) => {
    const t = touching[node];
    if (t.length !== 2) throw new Error(`${what} at node ${node} needs exactly two sections there, found ${t.length}`);
    return t;
  };
  for (const s of net.series) for (const br of straddle(s.node, 'series resistor')) g.rBe[br] += s.rOhm / 2;
  for (const s of net.inductors) for (const br of straddle(s.node, 'series inductor')) g.lH[br] += s.lH / 2;
  for (const s of net.shunts) {
    if (s.rOhm <= 0) g.fixed[s.node] = 1;
    else g.gS[s.node] += 1 / s.rOhm;
  }
  for (const c of net.caps) g.cF[c.node] += c.cF;
  return g;
}

/** Port voltage (node 0) at t = n·Δt, n = 0 … steps − 1; everything is at rest before t = 0. */
export function simulatePort(net: FdtdNetwork, s: FdtdSettings): Float64Array {
  const dt = s.dtS;
  const g = buildGrid(net, dt, s.omegaMin);
  const { nodes, branches, na, nb, skinPoles: P, dielPoles: K } = g;
  const V = new Float64Array(nodes);
  const I = new Float64Array(branches);
  const J = new Float64Array(nodes);
  const iSkin = new Float64Array(branches * P);
  const vDiel = new Float64Array(nodes * K);
  // Branch coefficients: I⁺ = (cOld·I⁻ + ΔV + Σβk·ik) / den.
  const cOld = new Float64Array(branches);
  const invDen = new Float64Array(branches);
  for (let b = 0; b < branches; b++) {
    let rEff = g.rCn[b];
    for (let k = 0; k < P; k++) rEff += g.skinBeta[b * P + k];
    cOld[b] = g.lH[b] / dt - rEff / 2;
    invDen[b] = 1 / (g.lH[b] / dt + rEff / 2 + g.rBe[b]);
  }
  // Node coefficients: V⁺ = (C/dt·V⁻ + J + src − Σ gk (V⁻/2 − vk⁻)) / den.
  const dielG = new Float64Array(nodes * K);
  const cDt = new Float64Array(nodes);
  const invNodeDen = new Float64Array(nodes);
  const gSrc = 1 / s.sourceOhm;
  for (let n = 0; n < nodes; n++) {
    let den = g.cF[n] / dt + g.gS[n] + (n === 0 ? gSrc : 0);
    for (let k = 0; k < K; k++) {
      const gk = (g.dielC[n * K + k] * (1 - g.dielB[k])) / dt;
      dielG[n * K + k] = gk;
      den += gk / 2;
    }
    cDt[n] = g.cF[n] / dt;
    invNodeDen[n] = 1 / den;
  }
  const fixed = g.fixed;
  const skinA = g.skinA;
  const skinBeta = g.skinBeta;
  const dielB = g.dielB;
  const out = new Float64Array(s.steps);
  for (let step = 0; step < s.steps; step++) {
    out[step] = V[0];
    for (let b = 0; b < branches; b++) {
      const base = b * P;
      let src = 0;
      for (let k = 0; k < P; k++) src += skinBeta[base + k] * iSkin[base + k];
      const old = I[b];
      const neu = (cOld[b] * old + V[na[b]] - V[nb[b]] + src) * invDen[b];
      const mean = 0.5 * (neu + old);
      for (let k = 0; k < P; k++) {
        const a = skinA[base + k];
        iSkin[base + k] = a * iSkin[base + k] + (1 - a) * mean;
      }
      I[b] = neu;
      J[na[b]] -= neu;
      J[nb[b]] += neu;
    }
    const vs = s.source((step + 1) * dt);
    for (let n = 0; n < nodes; n++) {
      if (fixed[n]) {
        V[n] = 0;
        J[n] = 0;
        continue;
      }
      const old = V[n];
      let rhs = cDt[n] * old + J[n];
      J[n] = 0;
      if (n === 0) rhs += vs * gSrc;
      const base = n * K;
      for (let k = 0; k < K; k++) rhs -= dielG[base + k] * (0.5 * old - vDiel[base + k]);
      const neu = rhs * invNodeDen[n];
      const mean = 0.5 * (neu + old);
      for (let k = 0; k < K; k++) vDiel[base + k] = dielB[k] * vDiel[base + k] + (1 - dielB[k]) * mean;
      V[n] = neu;
    }
  }
  return out;
}

/** Gaussian-filtered edge: 0 → 1 with its 50 % point at t = 0 and the given 10–90 % rise time. */
export function edge(tS: number, riseS: number): number {
  const sigma = riseS / 2.5631; // 10–90 % of an erf edge is 2.5631 σ
  return 0.5 * (1 + erf(tS / (Math.SQRT2 * sigma)));
}

/** Error function from erfc below. */
export function erf(x: number): number {
  return 1 - erfc(x);
}

export function erfc(x: number): number {
  // Chebyshev fit from W. H. Press et al., "Numerical Recipes in C", 2nd ed., §6.2 (erfcc): fractional error below 1.2e-7.
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
                t *
                  (0.09678418 +
                    t *
                      (-0.18628806 +
                        t * (0.27886807 + t * (-1.13520398 + t * (1.48851587 + t * (-0.82215223 + t * 0.17087277)))))))),
    );
  return x >= 0 ? r : 2 - r;
}

/**
 * Propagation constant γ = α + jβ per metre of a cable as the solver sees it (the same pole
 * fits), as a function of angular frequency, for a run with time step dt whose record spans ω_min.
 */
export function propagationOf(cable: CableRlgc, dtS: number, omegaMin: number): (omega: number) => [number, number] {
  const v = cable.vf * C0;
  const L = cable.z0Ohm / v;
  const Cinf = 1 / (cable.z0Ohm * v);
  const skin = fitSkin(cable.rdcOhmPerM, cable.skinOhmPerMRootHz, 2 / dtS, omegaMin);
  const diel = fitDielectric(Cinf, cable.tanDelta, Math.max(omegaMin / 3, 1), (2 / dtS) * 3);
  return (omega) => {
    const [zr, zi0] = skinImpedance(skin, omega);
    const zi = zi0 + omega * L;
    const [yr, yi] = dielectricAdmittance(Cinf, cable.gSPerM ?? 0, diel, omega);
    // γ = √(Z·Y), principal root (Re ≥ 0).
    const pr = zr * yr - zi * yi;
    const pi = zr * yi + zi * yr;
    const m = Math.hypot(pr, pi);
    const re = Math.sqrt((m + pr) / 2);
    const im = Math.sign(pi || 1) * Math.sqrt(Math.max(0, (m - pr) / 2));
    return [re, im];
  };
}
