/**
 * One random trace of the second simulator: draw a cable route and an
 * instrument set-up, run the time-domain solver, record it with the
 * instrument's quirks, write it in a CSV layout, and list what an ideal
 * engine should report, with the rule that decides whether each event is
 * required.
 *
 * An expected event is `required: false` only where physics or the record
 * makes it unreadable, by these rules (checked in this order):
 *  - too small: |ρ| under 0.02 on a lossless line (a change between cables
 *    of nearly the same impedance, a matched end);
 *  - outside the record: its round trip ends after the last sample (dropped),
 *    or within one edge (pulse: width + 2 rises; step: 4 rises) plus 4
 *    samples of the end;
 *  - inside the launch: its round trip is shorter than the launch (pulse:
 *    width + 2 rises; step: 2 rises) plus 2 samples;
 *  - not resolved: it arrives within one edge plus 2 samples of an earlier
 *    expected event, or closer than twice the distance tolerance to it;
 *  - masked: it is under 3 % of an earlier event's size (both as seen at the
 *    port) that arrives less than 5 edges before it, whose lossy tail it
 *    sits on;
 *  - hidden by clipping: the recorder is held at its limit from 2 samples
 *    before its arrival to 2 samples past its edge;
 *  - below the noise: its expected amplitude A after loss is under 6 σeff.
 *    A is |ρ seen| · V+ times the pulse's lossy peak ratio (pulse) or the
 *    fraction of the step reached before the next event or the record's end
 *    (step), from ./loss.ts (a step's share over a window grown until it
 *    settles, so a long pair's slow tail does not wrap round into it). The first edge of a section shorter than the
 *    edge is measured together with its closing edge, which arrives inside
 *    it with the opposite sign: A is the peak of their sum (a step record
 *    then shows a blip, averaged over its width at half height). σeff is the noise an ideal detector sees after
 *    averaging over the N samples the echo spans (pulse: its lossy width at
 *    half height; step: the time to the next event), N capped at 16:
 *    σeff² = (σwhite² + LSB²/12)/N + σcoloured² (coloured noise does not
 *    average away). With white noise and N = 16 that is A < 1.5 σ.
 * ρ is not checked (`rhoCheck: false`) where it cannot be read: a short
 * section whose two edges overlap within one edge, or a clipped record.
 */
import { type Cable, type CableKind, drawCable, drawOtherType } from './cables';
import { C0, edge, simulatePort } from './fdtd';
import { interpolate, type Quirks, record } from './instrument';
import { ALL_LAYOUTS, decorate, PULSE_ONLY, type Sim2Layout, STARTS_AT_LAUNCH, writeTrace } from './layouts';
import { dbPer100m, echoShape, settledShape } from './loss';
import { makeRng, type Rng } from './rng';
import { type Arrival, buildPhysical, type End, type Feature, lattice, type ReflectionType, type Route, toFdtd } from './route';

export interface Sim2Event {
  distanceM: number;
  type: ReflectionType;
  what: string;
  /** Allowed but not required (see `why`). */
  optional?: boolean;
  required: boolean;
  /** Why the event is not required. */
  why?: string;
  /** Local reflection coefficient of the feature on a lossless line. */
  rho: number;
  /** What the port shows on a lossless line: ρ through earlier features and the source mismatch. */
  rhoSeen: number;
  rhoCheck: boolean;
  alsoAccept?: ReflectionType[];
  physicalM: number;
  /** Where the noise rule was applied: the echo's expected amplitude after loss over σeff (see the header). */
  snrEff?: number;
}

export interface Sim2Echo {
  distanceM: number;
  /** Lossless size at the port relative to V+. */
  rho: number;
}

export interface Sim2Case {
  id: string;
  csv: string;
  layout: Sim2Layout;
  /** Options to hand the reader (a multi-channel file whose trace is not the first channel). */
  parseOptions?: { channel?: string };
  expected: Sim2Event[];
  /** Multiple reflections an engine may report only as echoes (likelyMultipleOf set). */
  echoes: Sim2Echo[];
  vf: number;
  z0Ohm: number;
  loss: Array<{ dbPer100m: number; frequencyHz: number }>;
  cableKind: CableKind;
  cableName: string;
  lengthM: number;
  mode: 'step' | 'pulse';
  pulseWidthNs: number | null;
  riseTimeNs: number;
  snrDb: number;
  preTriggerPct: number;
  bits: 8 | 12 | 16;
  sampleIntervalNs: number;
  samples: number;
  recordOverRoundTrip: number;
  sourceOhm: number;
  clipped: boolean;
  instrumentVf: number;
  features: string[];
}

const KIND_WEIGHTS: Array<[CableKind, number]> = [
  ['coax-50', 0.2],
  ['coax-75', 0.13],
  ['pair', 0.3],
  ['power-lv', 0.15],
  ['power-mv', 0.22],
];
const MAX_LENGTH: Record<CableKind, number> = {
  'coax-50': 2000,
  'coax-75': 3000,
  pair: 5000,
  'power-lv': 1500,
  'power-mv': 5000,
};
/** Largest solver grid, cells × steps, so a trace takes about a second at most. */
const GRID_BUDGET = 1.2e7;

function pickWeighted<T>(rng: Rng, items: Array<[T, number]>): T {
  let u = rng.next() * items.reduce((s, [, w]) => s + w, 0);
  for (const [x, w] of items) {
    u -= w;
    if (u <= 0) return x;
  }
  return items[items.length - 1][0];
}

/** |ρ| for a fault: mostly partial (0.03–0.6), sometimes near-total (0.93–0.995). */
function drawRhoMagnitude(rng: Rng): number {
  return rng.chance(0.8) ? rng.logUniform(0.03, 0.6) : rng.uniform(0.93, 0.995);
}

const tolerance = (d: number) => Math.max(0.5, 0.01 * d);

/**
 * Multiple reflections: every arrival after more than one bounce, at its apparent distance at the
 * nominal VF, merged within half a tolerance. On a straight line a wave needs an odd number of bounces
 * to come home (three at least), but where a line branches (a bridged tap) one can come home after
 * two: back from the far end, into the stub at the junction without a bounce, and back from the stub's
 * end. Such an arrival is a multiple like any other.
 */
export function echoList(arrivals: readonly Arrival[], vfNominal: number): Sim2Echo[] {
  const echoes: Sim2Echo[] = [];
  for (const a of arrivals) {
    if (a.reflections < 2 || Math.abs(a.amplitude) < 3e-3) continue;
    const d = (a.timeS * vfNominal * C0) / 2;
    const near = echoes.find((e) => Math.abs(e.distanceM - d) < tolerance(d) / 2);
    if (near) near.rho += a.amplitude;
    else echoes.push({ distanceM: d, rho: a.amplitude });
  }
  return echoes;
}

interface Setup {
  mode: 'step' | 'pulse';
  riseS: number;
  widthS?: number;
  dtOutS: number;
  samples: number;
  recordS: number;
  pre: number;
  dtSimS: number;
}

function drawSetup(rng: Rng, roundTripS: number, vf: number, lengthM: number, layout: Sim2Layout): Setup {
  const mode: 'step' | 'pulse' = PULSE_ONLY.has(layout) ? 'pulse' : rng.chance(0.5) ? 'pulse' : 'step';
  let widthS: number | undefined;
  let riseS: number;
  if (mode === 'pulse') {
    const lo = Math.max(2e-9, roundTripS / 4000);
    const hi = Math.max(lo * 1.5, Math.min(1e-6, roundTripS / 3));
    widthS = rng.logUniform(lo, hi);
    riseS = widthS * rng.uniform(0.1, 0.35);
  } else {
    const lo = Math.max(50e-12, roundTripS / 3000);
    riseS = rng.logUniform(lo, Math.max(lo * 1.5, roundTripS / 30));
  }
  const recordS = roundTripS * (rng.chance(0.15) ? rng.uniform(0.4, 0.95) : rng.uniform(1.1, 3));
  const pre = STARTS_AT_LAUNCH.has(layout) || rng.chance(0.3) ? 0 : rng.uniform(0.01, 0.25);
  // The sample interval is the instrument's own choice, drawn without regard to the cable, kept
  // only if the record holds 400–120 000 samples and a sample spans less than the distance tolerance.
  let dtOutS = 0;
  for (let tries = 0; tries < 400; tries++) {
    const dt = rng.logUniform(20e-12, 200e-9);
    const n = recordS / dt;
    if (n >= 400 && n <= 120_000 && (dt * vf * C0) / 2 <= 0.8 * tolerance(lengthM)) {
      dtOutS = dt;
      break;
    }
  }
  if (dtOutS === 0) dtOutS = Math.min(recordS / 400, (1.6 * tolerance(lengthM)) / (vf * C0));
  // The acquisition's own filter keeps the edge at least 1.5 samples long.
  riseS = Math.max(riseS, 1.5 * dtOutS);
  if (widthS !== undefined) widthS = Math.max(widthS, 2.5 * riseS);
  const horizon = (1 - pre) * recordS + 8 * riseS + (widthS ?? 0);
  let dtSimS = riseS / 6;
  if (((horizon / dtSimS) * (horizon / dtSimS)) / 2 > GRID_BUDGET) {
    dtSimS = horizon / Math.sqrt(2 * GRID_BUDGET);
    riseS = 6 * dtSimS;
    if (widthS !== undefined) widthS = Math.max(widthS, 2.5 * riseS);
  }
  return { mode, riseS, widthS, dtOutS, samples: Math.round(recordS / dtOutS), recordS, pre, dtSimS };
}

function drawFeatures(rng: Rng, cable: Cable, lengthM: number, minGapM: number): { features: Feature[]; end: End } {
  const z = cable.z0Ohm;
  const count = pickWeighted(rng, [
    [0, 0.15],
    [1, 0.4],
    [2, 0.3],
    [3, 0.15],
  ]);
  const kinds: Array<[Feature['kind'], number]> =
    cable.kind === 'pair'
      ? [
          ['series', 0.2],
          ['shunt', 0.25],
          ['wet', 0.15],
          ['tap', 0.15],
          ['splice', 0.1],
          ['change', 0.1],
          ['cut', 0.05],
        ]
      : cable.kind.startsWith('coax')
        ? [
            ['series', 0.2],
            ['shunt', 0.25],
            ['splice', 0.25],
            ['wet', 0.1],
            ['change', 0.1],
            ['cut', 0.1],
          ]
        : [
            ['series', 0.1],
            ['shunt', 0.35],
            ['splice', 0.25],
            ['wet', 0.15],
            ['change', 0.1],
            ['cut', 0.05],
          ];
  const features: Feature[] = [];
  const taken: Array<[number, number]> = [];
  const free = (a: number, b: number) => taken.every(([x, y]) => b + minGapM < x || a - minGapM > y);
  for (let k = 0; k < count; k++) {
    const kind = pickWeighted(
      rng,
      kinds.filter(([k]) => k !== 'change' || !features.some((f) => f.kind === 'change')),
    );
    for (let tries = 0; tries < 30; tries++) {
      const at = rng.uniform(0.02, 0.95) * lengthM;
      let span = 0;
      let f: Feature;
      switch (kind) {
        case 'series': {
          const r = drawRhoMagnitude(rng);
          f = { kind, atM: at, rOhm: (2 * z * r) / (1 - r) };
          break;
        }
        case 'shunt': {
          const r = drawRhoMagnitude(rng);
          f = { kind, atM: at, rOhm: (z * (1 - r)) / (2 * r) };
          break;
        }
        case 'cut':
          f = { kind, atM: at };
          break;
        case 'splice':
          span = rng.uniform(0.2, 2.5);
          f = { kind, atM: at, lengthM: span, zScale: rng.chance(0.7) ? rng.uniform(0.55, 0.85) : rng.uniform(1.2, 1.6) };
          break;
        case 'wet':
          span = Math.max(rng.logUniform(2, Math.max(3, Math.min(80, 0.3 * lengthM))), 3 * minGapM);
          f = {
            kind,
            atM: at,
            lengthM: span,
            zScale: rng.uniform(0.6, 0.9),
            vfScale: rng.uniform(0.8, 0.95),
            gSPerM: rng.chance(0.5) ? rng.logUniform(1e-6, 1e-4) : 0,
          };
          break;
        case 'tap':
          span = Math.max(rng.logUniform(3, Math.max(4, Math.min(300, 0.5 * lengthM))), 3 * minGapM);
          f = { kind, atM: at, lengthM: span };
          break;
        case 'change':
          f = { kind, atM: at, cable: drawOtherType(cable, rng) };
          break;
      }
      const reach = kind === 'tap' ? at + span * 1.3 : at + span;
      if (reach > lengthM - minGapM || at < minGapM || !free(at, reach)) continue;
      if (features.some((g) => g.kind === 'cut' && g.atM < at) || (kind === 'cut' && features.some((g) => g.atM > at))) continue;
      features.push(f);
      taken.push([at, reach]);
      break;
    }
  }
  const endKind = pickWeighted(rng, [
    ['open', 0.45],
    ['short', 0.15],
    ['resistor', 0.2],
    ['matched', 0.2],
  ] as Array<[End['kind'], number]>);
  let end: End;
  if (endKind === 'resistor') {
    const r = drawRhoMagnitude(rng) * (rng.chance(0.5) ? 1 : -1);
    end = { kind: 'resistor', rOhm: (z * (1 + r)) / (1 - r) };
  } else end = { kind: endKind } as End;
  return { features, end };
}

function describe(f: Feature): string {
  switch (f.kind) {
    case 'series':
    case 'shunt':
      return `${f.kind} ${f.rOhm.toPrecision(3)} Ω at ${f.atM.toFixed(2)} m`;
    case 'cut':
      return `cut at ${f.atM.toFixed(2)} m`;
    case 'splice':
      return `splice ×${f.zScale.toFixed(2)} Z, ${f.lengthM.toFixed(2)} m at ${f.atM.toFixed(2)} m`;
    case 'wet':
      return `wet ×${f.zScale.toFixed(2)} Z ×${f.vfScale.toFixed(2)} VF, ${f.lengthM.toFixed(1)} m at ${f.atM.toFixed(2)} m`;
    case 'tap':
      return `bridged tap ${f.lengthM.toFixed(1)} m at ${f.atM.toFixed(2)} m`;
    case 'change':
      return `to ${f.cable.name} (${f.cable.z0Ohm.toFixed(0)} Ω, VF ${f.cable.vf.toFixed(3)}) at ${f.atM.toFixed(2)} m`;
  }
}

const INSTRUMENT_OHMS = [25, 35, 50, 75, 100, 125];

export function drawCase(seed: number, index: number, prefix: string): Sim2Case {
  const rng = makeRng(seed);
  const kind = pickWeighted(rng, KIND_WEIGHTS);
  const cable = drawCable(kind, rng);
  const lengthM = rng.logUniform(3, MAX_LENGTH[kind]);
  const layout = rng.pick(ALL_LAYOUTS);
  const roundTripS = (2 * lengthM) / (cable.vf * C0);
  const su = drawSetup(rng, roundTripS, cable.vf, lengthM, layout);
  const v = cable.vf * C0;
  // Features stay apart by the launch's length in metres, four solver cells and 1 m.
  const edgeM = ((su.widthS ?? 0) + 2 * su.riseS) * (v / 2);
  const minGapM = Math.max(1, 4 * v * su.dtSimS, 1.2 * edgeM, 2.5 * tolerance(lengthM));
  const { features, end } = drawFeatures(rng, cable, lengthM, minGapM);
  const route: Route = { cable, lengthM, end, features };
  const phys = buildPhysical(route);

  // Source: the instrument's nearest output impedance, or sometimes another one.
  const nearest = INSTRUMENT_OHMS.reduce((a, b) => (Math.abs(b - cable.z0Ohm) < Math.abs(a - cable.z0Ohm) ? b : a));
  let sourceOhm = rng.chance(0.55) ? nearest : rng.pick(INSTRUMENT_OHMS);
  if (sourceOhm / cable.z0Ohm > 2.2 || sourceOhm / cable.z0Ohm < 0.45) sourceOhm = nearest;
  const vs = rng.pick([2, 5, 10, 20]);
  const vPlus = (vs * cable.z0Ohm) / (cable.z0Ohm + sourceOhm);

  // Solve. The launch's 50 % point is at tL on the solver's clock.
  const tL = 4 * su.riseS;
  const recordStart = tL - su.pre * su.recordS;
  const recordEnd = recordStart + su.recordS;
  const horizon = recordEnd + 2 * su.riseS;
  const omegaMin = (2 * Math.PI) / Math.max(horizon, 10 * su.riseS);
  const steps = Math.ceil(horizon / su.dtSimS) + 4;
  const width = su.widthS ?? 0;
  const port = simulatePort(toFdtd(phys, su.dtSimS, horizon - tL + 4 * su.riseS), {
    dtS: su.dtSimS,
    steps,
    sourceOhm,
    source: (t) => {
      const e = edge(t - tL, su.riseS);
      return vs * (su.mode === 'pulse' ? e - edge(t - tL - width, su.riseS) : e);
    },
    omegaMin,
  });
  const n = su.samples;
  const clean = new Float64Array(n);
  for (let i = 0; i < n; i++) clean[i] = interpolate(port, su.dtSimS, recordStart + i * su.dtOutS);

  // Quirks.
  const snrDb = rng.uniform(12, 70);
  const sigma = vPlus * 10 ** (-snrDb / 20);
  const colour = rng.chance(0.5) ? 'none' : rng.chance(0.5) ? 'ar1' : 'pink';
  const colouredShare = colour === 'none' ? 0 : rng.uniform(0.2, 0.8);
  const bits = rng.pick([8, 12, 16] as const);
  const offsetV = rng.chance(0.5) ? vPlus * rng.uniform(-0.2, 0.2) : 0;
  const driftV = rng.chance(0.4) ? vPlus * rng.uniform(-0.1, 0.1) : 0;
  let peak = 0;
  for (let i = 0; i < n; i++) peak = Math.max(peak, Math.abs(clean[i] + offsetV + (driftV * i) / n));
  const headroom = rng.chance(0.1) ? rng.uniform(0.75, 0.95) : rng.uniform(1.1, 2.5);
  const q: Quirks = {
    offsetV,
    driftV,
    bits,
    fullScaleV: peak * headroom,
    whiteSigmaV: sigma * Math.sqrt(1 - colouredShare),
    colouredSigmaV: sigma * Math.sqrt(colouredShare),
    colour,
    ar1: rng.uniform(0.9, 0.995),
    seed: rng.int(1, 1e9),
  };
  const rec = record(clean, q, rng);

  // Axis: zero at the launch (usual) or at the first sample; distance-from-zero files start at the launch.
  const zeroAtFirst = !STARTS_AT_LAUNCH.has(layout) && rng.chance(0.25);
  const timeS = new Float64Array(n);
  for (let i = 0; i < n; i++) timeS[i] = recordStart + i * su.dtOutS - (zeroAtFirst ? recordStart : tL);
  const instrumentVf = Math.round(cable.vf * (rng.chance(0.6) ? 1 : rng.uniform(0.94, 1.06)) * 1000) / 1000;
  const deco = decorate(layout, rng);
  const csv = writeTrace({
    layout,
    timeS,
    volts: rec.volts,
    incidentV: vPlus,
    mode: su.mode,
    instrumentVf,
    cableName: cable.name,
    z0Ohm: Math.round(cable.z0Ohm),
    pulseWidthS: su.widthS,
    ...deco,
  });

  // Truth.
  const recordAfterLaunch = recordEnd - tL;
  const arrivals = lattice(phys, sourceOhm, recordAfterLaunch + 4 * su.riseS, 2e-3);
  const whiteVar = q.whiteSigmaV ** 2 + ((2 * q.fullScaleV) / 2 ** bits) ** 2 / 12;
  const edgeS = su.mode === 'pulse' ? width + 2 * su.riseS : 2 * su.riseS;
  const lossFreqs = [1e5, 1e6, 1e7, 1e8, 1e9].filter((f) => 2 * Math.PI * f >= omegaMin && 2 * Math.PI * f <= 0.5 / su.dtSimS);
  const centre = 0.35 / su.riseS;
  lossFreqs.sort((a, b) => Math.abs(Math.log(a / centre)) - Math.abs(Math.log(b / centre)));
  const loss = lossFreqs
    .slice(0, 3)
    .sort((a, b) => a - b)
    .map((f) => ({ dbPer100m: Number(dbPer100m(cable, f, su.dtSimS, omegaMin).toPrecision(4)), frequencyHz: f }));

  const expected: Sim2Event[] = [];
  const evs = [...phys.events].sort((a, b) => a.delayS - b.delayS);
  let lastT = -Infinity;
  let lastD = -Infinity;
  const seenBefore: Array<{ t: number; seen: number }> = [];
  for (const ev of evs) {
    const t = 2 * ev.delayS;
    if (t > recordAfterLaunch) continue;
    const seen = arrivals.filter((a) => a.reflections === 1 && a.node === ev.node).reduce((s, a) => s + a.amplitude, 0);
    // A change between two cables of nearly the same impedance, or a matched end, is never required;
    // a reading of it is not false either (a lossy line's impedance moves off nominal at low
    // frequencies). It does not count as the event before for the rules below.
    if (Math.abs(ev.rho) < 0.02) {
      expected.push({
        distanceM: ev.distanceM,
        type: ev.type,
        what: ev.what,
        optional: true,
        why: 'too small to require (|ρ| < 0.02 on a lossless line)',
        required: false,
        rho: ev.rho,
        rhoSeen: seen,
        rhoCheck: false,
        ...(ev.alsoAccept ? { alsoAccept: ev.alsoAccept } : {}),
        physicalM: ev.physicalM,
      });
      continue;
    }
    let why: string | undefined;
    if (t > recordAfterLaunch - edgeS - 4 * su.dtOutS) why = 'at the end of the record';
    else if (t < edgeS + 2 * su.dtOutS) why = 'inside the launch';
    else if (t - lastT < edgeS + 2 * su.dtOutS || ev.distanceM - lastD < 2 * tolerance(ev.distanceM))
      why = 'not resolved from the event before';
    else if (seenBefore.some((b) => t - b.t < 5 * edgeS && Math.abs(seen) < 0.03 * Math.abs(b.seen)))
      why = 'masked by the tail of a larger echo before it';
    // Held at the recorder's limit from before its arrival to past its edge: the record does not show it.
    if (!why && rec.clipped) {
      const at = Math.round((tL + t - recordStart) / su.dtOutS);
      const from = Math.max(0, at - 2);
      const to = Math.min(n - 1, at + Math.ceil(edgeS / su.dtOutS) + 2);
      let held = to >= from;
      for (let i = from; i <= to && held; i++) held = rec.atLimit[i] === 1;
      if (held) why = 'hidden where the recorder is clipped';
    }
    let rhoCheck = !rec.clipped;
    let snrEff: number | undefined;
    if (ev.spanS !== undefined && 2 * ev.spanS < edgeS) {
      rhoCheck = false;
      if (ev.closes !== undefined) why ??= 'second edge of a section shorter than the edge';
    }
    if (!why) {
      const path = pathTo(phys, ev.node);
      const next = evs.find((o) => o.delayS > ev.delayS + 1e-15);
      const gap = Math.min(next ? 2 * (next.delayS - ev.delayS) : Infinity, recordAfterLaunch - t);
      // The first edge of a section shorter than the edge: its closing edge, of opposite sign, arrives
      // inside it and the two nearly cancel; the port sees their sum.
      const evIndex = phys.events.indexOf(ev);
      const closer = ev.spanS !== undefined && 2 * ev.spanS < edgeS ? evs.find((o) => o.closes === evIndex) : undefined;
      const closerSeen = closer
        ? arrivals.filter((a) => a.reflections === 1 && a.node === closer.node).reduce((s, a) => s + a.amplitude, 0)
        : 0;
      const pair = closer && seen !== 0 ? { delayS: 2 * (closer.delayS - ev.delayS), ratio: closerSeen / seen } : undefined;
      const exc = { mode: su.mode, riseS: su.riseS, widthS: su.widthS };
      const firstWindowS = Math.max(4 * gap, 40 * su.riseS);
      const shape =
        su.mode === 'step' && !pair
          ? settledShape(path, exc, gap, firstWindowS, su.dtSimS, omegaMin)
          : echoShape(path, exc, firstWindowS, su.dtSimS, omegaMin, pair);
      const h = su.mode === 'pulse' || pair ? shape.peakRatio : shape.stepReached(gap);
      const spanS = su.mode === 'pulse' || pair ? shape.halfWidthS : gap;
      const spanSamples = Math.min(16, Math.max(1, spanS / su.dtOutS));
      const sigmaEff = Math.sqrt(whiteVar / spanSamples + q.colouredSigmaV ** 2);
      const a = Math.abs(seen) * vPlus * h;
      snrEff = Number((a / sigmaEff).toFixed(2));
      if (a < 6 * sigmaEff) why = `below the noise (${(a / sigmaEff).toFixed(1)} σeff)`;
    }
    expected.push({
      distanceM: ev.distanceM,
      type: ev.type,
      what: ev.what,
      ...(why ? { optional: true, why } : {}),
      required: !why,
      rho: ev.rho,
      rhoSeen: seen,
      rhoCheck,
      ...(ev.alsoAccept ? { alsoAccept: ev.alsoAccept } : {}),
      physicalM: ev.physicalM,
      ...(snrEff !== undefined ? { snrEff } : {}),
    });
    lastT = t;
    lastD = ev.distanceM;
    seenBefore.push({ t, seen });
  }
  const echoes = echoList(arrivals, phys.vfNominal);

  const id = `${prefix}-${String(index).padStart(3, '0')}-${kind}-${Math.round(lengthM)}m-${su.mode}-${layout}`;
  return {
    id,
    csv,
    layout,
    ...(deco.channels && deco.channels.traceIndex > 0 ? { parseOptions: { channel: `CH${deco.channels.traceIndex + 1}` } } : {}),
    expected,
    echoes: echoes.map((e) => ({ distanceM: round(e.distanceM, 4), rho: round(e.rho, 4) })),
    vf: cable.vf,
    z0Ohm: cable.z0Ohm,
    loss,
    cableKind: kind,
    cableName: cable.name,
    lengthM,
    mode: su.mode,
    pulseWidthNs: su.widthS !== undefined ? su.widthS * 1e9 : null,
    riseTimeNs: su.riseS * 1e9,
    snrDb,
    preTriggerPct: su.pre * 100,
    bits,
    sampleIntervalNs: su.dtOutS * 1e9,
    samples: n,
    recordOverRoundTrip: su.recordS / roundTripS,
    sourceOhm,
    clipped: rec.clipped,
    instrumentVf,
    features: [...features.map(describe), `end: ${end.kind === 'resistor' ? `${end.rOhm.toPrecision(3)} Ω` : end.kind}`],
  };
}

const round = (x: number, d: number) => Number(x.toPrecision(d));

/** Sections from the port to a node (the network is a tree built outward). */
function pathTo(p: ReturnType<typeof buildPhysical>, node: number) {
  const path: Array<{ cable: (typeof p.edges)[number]['cable']; lengthM: number }> = [];
  let cur = node;
  while (cur !== 0) {
    const e = p.edges.find((x) => x.b === cur);
    if (!e) break;
    path.push({ cable: e.cable, lengthM: e.lengthM });
    cur = e.a;
  }
  return path;
}
