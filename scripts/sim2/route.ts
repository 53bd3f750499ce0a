/**
 * A cable route with features at known positions: the physical network, the
 * time-domain solver's version of it for a given time step, the lossless
 * lattice of its reflections, and the events an ideal engine should report.
 *
 * Distances of expected events are apparent distances: the one-way delay to
 * the feature times VF·c with the route's first (nominal) velocity factor,
 * which is the figure an instrument set to that VF shows. A wet section or a
 * change to a slower cable moves everything behind it further out.
 */
import type { Cable } from './cables';
import { C0, type CableRlgc, type FdtdNetwork, minSectionM } from './fdtd';

export type ReflectionType = 'open' | 'short' | 'impedance-rise' | 'impedance-drop';

export type Feature =
  | { kind: 'series'; atM: number; rOhm: number }
  | { kind: 'shunt'; atM: number; rOhm: number }
  | { kind: 'cut'; atM: number }
  /** Short section of changed impedance: extra capacitance (zScale < 1) or inductance (zScale > 1). */
  | { kind: 'splice'; atM: number; lengthM: number; zScale: number }
  /** Water in the insulation: lower impedance, slower, some leakage. */
  | { kind: 'wet'; atM: number; lengthM: number; zScale: number; vfScale: number; gSPerM: number }
  /** Open-ended stub of the same cable branching off. */
  | { kind: 'tap'; atM: number; lengthM: number }
  /** Another cable type from here on. */
  | { kind: 'change'; atM: number; cable: Cable };

export type End = { kind: 'open' } | { kind: 'short' } | { kind: 'resistor'; rOhm: number } | { kind: 'matched' };

export interface Route {
  cable: Cable;
  lengthM: number;
  end: End;
  features: Feature[];
}

/** ρ = (ZL − Z0)/(ZL + Z0) (D. M. Pozar, "Microwave Engineering", 4th ed., §2.3). */
export const reflection = (zl: number, z0: number) => (zl - z0) / (zl + z0);

/** Open/short for |ρ| ≥ 0.9 (the sets keep local |ρ| out of 0.65–0.9, so the type is unambiguous). */
export function typeOf(rho: number): ReflectionType {
  if (rho >= 0.9) return 'open';
  if (rho <= -0.9) return 'short';
  return rho > 0 ? 'impedance-rise' : 'impedance-drop';
}

export interface Discontinuity {
  /** Physical node of the feature (the lattice's reflector). */
  node: number;
  what: string;
  type: ReflectionType;
  /** Local reflection coefficient of the feature on a lossless line. */
  rho: number;
  /** Apparent distance at the nominal VF. */
  distanceM: number;
  physicalM: number;
  /** One-way delay from the port. */
  delayS: number;
  /** Other types a correct reading may give (a stub's open end seen through its junction). */
  alsoAccept?: ReflectionType[];
  /** Second edge of a short section, paired with the first. */
  closes?: number;
  /** Length of a short feature (splice, wet section), for resolution rules. */
  spanS?: number;
}

interface PEdge {
  a: number;
  b: number;
  lengthM: number;
  cable: CableRlgc;
  /** A splice section: the solver may carry it as a lumped element. */
  splice?: { base: CableRlgc; zScale: number };
}

export interface PhysicalNetwork {
  nodeCount: number;
  edges: PEdge[];
  shunt: Map<number, number>;
  series: Map<number, number>;
  /** One-way delay from the port to each node. */
  delay: number[];
  events: Discontinuity[];
  vfNominal: number;
}

export function buildPhysical(route: Route): PhysicalNetwork {
  const vfNom = route.cable.vf;
  const edges: PEdge[] = [];
  const shunt = new Map<number, number>();
  const series = new Map<number, number>();
  const delay = [0];
  const events: Discontinuity[] = [];
  let cur = 0;
  let pos = 0;
  let cable: CableRlgc = route.cable;
  let ended = false;
  const newNode = (d: number) => {
    delay.push(d);
    return delay.length - 1;
  };
  const addEdge = (a: number, lengthM: number, c: CableRlgc, splice?: PEdge['splice']) => {
    const b = newNode(delay[a] + lengthM / (c.vf * C0));
    edges.push({ a, b, lengthM, cable: c, splice });
    return b;
  };
  const advance = (to: number) => {
    if (to > pos + 1e-9) {
      cur = addEdge(cur, to - pos, cable);
      pos = to;
    }
  };
  const apparent = (node: number) => delay[node] * vfNom * C0;
  const event = (node: number, what: string, rho: number, extra: Partial<Discontinuity> = {}) => {
    events.push({
      node,
      what,
      type: typeOf(rho),
      rho,
      distanceM: apparent(node),
      physicalM: pos,
      delayS: delay[node],
      ...extra,
    });
  };
  const feats = [...route.features].sort((x, y) => x.atM - y.atM);
  for (const f of feats) {
    if (f.atM >= route.lengthM) break;
    advance(f.atM);
    const z = cable.z0Ohm;
    switch (f.kind) {
      case 'series':
        series.set(cur, f.rOhm);
        event(cur, `series ${fmt(f.rOhm)} Ω`, reflection(z + f.rOhm, z));
        break;
      case 'shunt':
        shunt.set(cur, f.rOhm);
        event(cur, `shunt ${fmt(f.rOhm)} Ω`, reflection((f.rOhm * z) / (f.rOhm + z), z));
        break;
      case 'cut':
        event(cur, 'open (cut)', 1);
        ended = true;
        break;
      case 'splice':
      case 'wet': {
        const zs = f.zScale;
        const sec: CableRlgc =
          f.kind === 'splice'
            ? { ...cable, z0Ohm: z * zs, vf: cable.vf * (zs < 1 ? zs : 1 / zs) }
            : { ...cable, z0Ohm: z * zs, vf: cable.vf * f.vfScale, gSPerM: f.gSPerM };
        const start = cur;
        const rho = reflection(z * zs, z);
        const spanS = f.lengthM / (sec.vf * C0);
        event(start, `${f.kind === 'splice' ? 'splice' : 'wet section'} start`, rho, { spanS });
        cur = addEdge(cur, f.lengthM, sec, f.kind === 'splice' ? { base: cable, zScale: zs } : undefined);
        pos += f.lengthM;
        event(cur, `${f.kind === 'splice' ? 'splice' : 'wet section'} end`, -rho, { closes: events.length - 1, spanS });
        break;
      }
      case 'tap': {
        const end = addEdge(cur, f.lengthM, cable);
        event(cur, 'bridged tap junction', reflection(z / 2, z));
        // What the line shows from the stub's open end: through the junction and back, (2/3)².
        const seen = (1 + reflection(z / 2, z)) ** 2;
        events.push({
          node: end,
          what: `bridged tap end (${fmt(f.lengthM)} m stub)`,
          type: typeOf(seen),
          rho: seen,
          distanceM: apparent(end),
          physicalM: pos + f.lengthM,
          delayS: delay[end],
          alsoAccept: ['open'],
        });
        break;
      }
      case 'change':
        event(cur, 'change of cable type', reflection(f.cable.z0Ohm, z));
        cable = f.cable;
        break;
    }
    if (ended) break;
  }
  if (!ended) {
    advance(route.lengthM);
    const z = cable.z0Ohm;
    const e = route.end;
    if (e.kind === 'open') event(cur, 'cable end (open)', 1);
    else if (e.kind === 'short') {
      shunt.set(cur, 0);
      event(cur, 'cable end (short)', -1);
    } else if (e.kind === 'resistor') {
      shunt.set(cur, e.rOhm);
      event(cur, `cable end (${fmt(e.rOhm)} Ω)`, reflection(e.rOhm, z));
    } else {
      shunt.set(cur, z);
      // A resistor of the nominal impedance: no reflection on a lossless line, but a lossy line's
      // impedance departs from nominal at low frequencies, so a small one shows; either reading is right.
      event(cur, 'cable end (matched)', 0, { alsoAccept: ['impedance-rise', 'impedance-drop'] });
    }
  }
  return { nodeCount: delay.length, edges, shunt, series, delay, events, vfNominal: vfNom };
}

const fmt = (x: number) => (x >= 100 ? x.toFixed(0) : x >= 10 ? x.toFixed(1) : x.toPrecision(2));

/**
 * The solver's network for time step dt, cut off where no reflection can come back within
 * `horizonS` (the cut is terminated in its own impedance). A splice shorter than two cells
 * becomes its excess capacitance or inductance at the splice's start.
 */
export function toFdtd(p: PhysicalNetwork, dt: number, horizonS: number): FdtdNetwork {
  const reach = horizonS / 2;
  const net: FdtdNetwork = { nodeCount: 1, lines: [], shunts: [], series: [], caps: [], inductors: [] };
  const map = new Map<number, number>([[0, 0]]);
  const keep = (phys: number) => {
    let id = map.get(phys);
    if (id === undefined) {
      id = net.nodeCount++;
      map.set(phys, id);
    }
    return id;
  };
  // Lumped splices fold their length into the next section; remember how much to add.
  const carry = new Map<number, number>();
  for (const e of p.edges) {
    const d0 = p.delay[e.a];
    if (d0 >= reach || !map.has(e.a)) continue;
    const a = map.get(e.a)!;
    const extra = carry.get(e.a) ?? 0;
    const base = e.splice?.base ?? e.cable;
    if (e.splice && e.lengthM < 2 * minSectionM(e.cable, dt)) {
      const L = base.z0Ohm / (base.vf * C0);
      const C = 1 / (base.z0Ohm * base.vf * C0);
      const z = e.splice.zScale;
      if (z < 1) net.caps.push({ node: a, cF: e.lengthM * C * (1 / (z * z) - 1) });
      else net.inductors.push({ node: a, lH: e.lengthM * L * (z * z - 1) });
      map.set(e.b, a);
      carry.set(e.b, extra + e.lengthM);
      continue;
    }
    const len = e.lengthM + extra;
    const vel = e.cable.vf * C0;
    const d1 = d0 + len / vel;
    if (d1 > reach) {
      // Cut the section where its far part can no longer be seen, and end it matched.
      const cutLen = Math.max((reach - d0) * vel + 4 * minSectionM(e.cable, dt), minSectionM(e.cable, dt));
      const b = net.nodeCount++;
      net.lines.push({ a, b, lengthM: Math.min(len, cutLen), cable: e.cable });
      net.shunts.push({ node: b, rOhm: e.cable.z0Ohm });
      continue;
    }
    const b = keep(e.b);
    net.lines.push({ a, b, lengthM: len, cable: e.cable });
  }
  for (const [phys, r] of p.shunt) if (map.has(phys) && p.delay[phys] < reach) net.shunts.push({ node: map.get(phys)!, rOhm: r });
  for (const [phys, r] of p.series)
    if (map.has(phys) && p.delay[phys] < reach) net.series.push({ node: map.get(phys)!, rOhm: r });
  // A series element needs a section on each side; if the far one was cut away, end it matched.
  for (const s of net.series) {
    const n = net.lines.filter((l) => l.a === s.node || l.b === s.node).length;
    if (n < 2) {
      const ln = net.lines.find((l) => l.b === s.node)!;
      const b = net.nodeCount++;
      net.lines.push({ a: s.node, b, lengthM: 4 * minSectionM(ln.cable, dt), cable: ln.cable });
      net.shunts.push({ node: b, rOhm: ln.cable.z0Ohm });
    }
  }
  return net;
}

export interface Arrival {
  timeS: number;
  /** Port voltage step (or pulse height) relative to the launched wave V+, lossless. */
  amplitude: number;
  reflections: number;
  /** Node of the only reflection, for first-order arrivals. */
  node: number;
}

/**
 * Lossless lattice (bounce) diagram of the network: every path from the port back to the port
 * up to `untilS`, pruned below `floor` of the launched wave. Scattering at a junction of lines
 * with admittances Yi and a shunt conductance G: node voltage V = 2·Σ Yi·ai / (ΣYi + G), each
 * outgoing wave bi = V − ai; a series resistor between two lines is solved the same way from
 * Kirchhoff's laws. The port's own mismatch ρs re-launches what comes back; the port shows
 * (1 + ρs) of each arriving wave.
 */
export function lattice(p: PhysicalNetwork, sourceOhm: number, untilS: number, floor = 1e-3): Arrival[] {
  const adj: number[][] = Array.from({ length: p.nodeCount }, () => []);
  p.edges.forEach((e, i) => {
    adj[e.a].push(i);
    adj[e.b].push(i);
  });
  // Scattering matrix per node over its edges, in adj order.
  const S = adj.map((edgesAt, n) => {
    const m = edgesAt.length;
    const Y = edgesAt.map((i) => 1 / p.edges[i].cable.z0Ohm);
    if (n === 0) {
      const z = 1 / Y[0];
      return [[reflection(sourceOhm, z)]];
    }
    const rs = p.series.get(n);
    if (rs !== undefined && m === 2) {
      // Unit wave in on line k; solve for the two outgoing waves.
      const [z1, z2] = edgesAt.map((i) => p.edges[i].cable.z0Ohm);
      const out: number[][] = [
        [0, 0],
        [0, 0],
      ];
      for (let k = 0; k < 2; k++) {
        const za = k === 0 ? z1 : z2;
        const zb = k === 0 ? z2 : z1;
        // Incoming wave sees R + Zb: reflected ρ = (R + Zb − Za)/(R + Zb + Za); line-b voltage = V·Zb/(R + Zb).
        const r = reflection(rs + zb, za);
        const vNode = 1 + r;
        const t = (vNode * zb) / (rs + zb);
        out[k][k] = r;
        out[1 - k][k] = t;
      }
      return out;
    }
    const shunt = p.shunt.get(n);
    if (shunt === 0) return Y.map((_, i) => Y.map((__, j) => (i === j ? -1 : 0)));
    const G = shunt !== undefined ? 1 / shunt : 0;
    const sumY = Y.reduce((s, y) => s + y, 0) + G;
    return Y.map((_, i) => Y.map((yj, j) => (2 * yj) / sumY - (i === j ? 1 : 0)));
  });
  const arrivals: Arrival[] = [];
  // Wave travelling on edge e towards node `to`, arriving at time t.
  const stack: Array<{ e: number; to: number; t: number; amp: number; refl: number; node: number; from: number }> = [];
  const e0 = adj[0][0];
  const first = p.edges[e0];
  stack.push({ e: e0, to: first.b, t: first.lengthM / (first.cable.vf * C0), amp: 1, refl: 0, node: -1, from: 0 });
  const rhoS = S[0][0][0];
  let budget = 400_000;
  while (stack.length && budget-- > 0) {
    const w = stack.pop()!;
    if (w.t > untilS) continue;
    if (w.to === 0) {
      arrivals.push({ timeS: w.t, amplitude: w.amp * (1 + rhoS), reflections: w.refl, node: w.node });
      const amp = w.amp * rhoS;
      if (Math.abs(amp) >= floor) {
        const ed = p.edges[w.e];
        stack.push({
          e: w.e,
          to: ed.b,
          t: w.t + ed.lengthM / (ed.cable.vf * C0),
          amp,
          refl: w.refl + 1,
          node: w.refl === 0 ? 0 : -1,
          from: 0,
        });
      }
      continue;
    }
    const at = adj[w.to];
    const k = at.indexOf(w.e);
    for (let j = 0; j < at.length; j++) {
      const amp = w.amp * S[w.to][j][k];
      if (Math.abs(amp) < floor) continue;
      const ed = p.edges[at[j]];
      const reflected = j === k;
      const to = ed.a === w.to ? ed.b : ed.a;
      stack.push({
        e: at[j],
        to,
        t: w.t + ed.lengthM / (ed.cable.vf * C0),
        amp,
        refl: w.refl + (reflected ? 1 : 0),
        node: reflected ? (w.refl === 0 ? w.to : -1) : w.node,
        from: w.to,
      });
    }
  }
  return arrivals.sort((x, y) => x.timeS - y.timeS);
}
