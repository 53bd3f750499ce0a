/**
 * The simulator sweep: cable routes with known faults, each acquired as a step
 * or pulse trace with noise and ADC quantisation, written in one of the CSV
 * layouts. The engine must place every feature within max(0.5 m, 1 %) with the
 * right type and report nothing else.
 */
import { COAX_50, COAX_75, PAIR_100, POWER_LV, POWER_MV } from './cables';
import { LAYOUTS, type Layout, writeLayout } from './layouts';
import { type Acquisition, defaultAcquisition, type ExpectedEvent, type Scenario, simulateScenario } from './scenario';

export interface SweepCase {
  id: string;
  scenario: Scenario;
  acquisition: Acquisition;
  layout: Layout;
  csv: string;
  expected: ExpectedEvent[];
  vf: number;
  z0Ohm: number;
}

type Route = Omit<Scenario, 'name'> & { modes?: Array<'step' | 'pulse'> };

const ROUTES: Route[] = [
  { cable: COAX_50, lengthM: 5, end: 'open', features: [] },
  { cable: COAX_50, lengthM: 12, end: 'short', features: [] },
  { cable: COAX_50, lengthM: 30, end: 'open', features: [{ kind: 'series', atM: 11, rOhm: 25 }] },
  { cable: COAX_50, lengthM: 60, end: 'matched', features: [{ kind: 'shunt', atM: 23.5, rOhm: 100 }] },
  { cable: COAX_50, lengthM: 100, end: 'open', features: [] },
  { cable: COAX_50, lengthM: 45, end: 'matched', features: [] },
  { cable: COAX_75, lengthM: 80, end: 'open', features: [{ kind: 'splice', atM: 31, lengthM: 0.4, zScale: 0.7 }] },
  { cable: COAX_75, lengthM: 150, end: 'short', features: [{ kind: 'wet', atM: 62, lengthM: 12, zScale: 0.8, vfScale: 0.85 }] },
  { cable: COAX_75, lengthM: 250, end: 'matched', features: [{ kind: 'open', atM: 173 }] },
  { cable: PAIR_100, lengthM: 40, end: 'open', features: [{ kind: 'shunt', atM: 17, rOhm: 50 }] },
  { cable: PAIR_100, lengthM: 120, end: 'open', features: [{ kind: 'wet', atM: 48, lengthM: 15, zScale: 0.75, vfScale: 0.85 }] },
  { cable: PAIR_100, lengthM: 300, end: 'short', features: [] },
  { cable: PAIR_100, lengthM: 200, end: 'matched', features: [] },
  { cable: PAIR_100, lengthM: 600, end: 'open', features: [{ kind: 'shunt', atM: 260, rOhm: 40 }] },
  { cable: POWER_LV, lengthM: 90, end: 'open', features: [{ kind: 'short', atM: 54, rOhm: 0.5 }] },
  { cable: POWER_LV, lengthM: 250, end: 'open', features: [{ kind: 'series', atM: 140, rOhm: 40 }] },
  { cable: POWER_LV, lengthM: 400, end: 'matched', features: [] },
  { cable: POWER_MV, lengthM: 450, end: 'open', features: [{ kind: 'splice', atM: 180, lengthM: 0.6, zScale: 0.6 }] },
  { cable: POWER_MV, lengthM: 1200, end: 'open', features: [{ kind: 'shunt', atM: 730, rOhm: 15 }] },
  {
    cable: POWER_MV,
    lengthM: 2000,
    end: 'open',
    features: [
      { kind: 'splice', atM: 820, lengthM: 4, zScale: 0.6 },
      { kind: 'shunt', atM: 1450, rOhm: 15 },
    ],
  },
  { cable: POWER_MV, lengthM: 3000, end: 'open', features: [] },
  { cable: POWER_MV, lengthM: 2600, end: 'matched', features: [{ kind: 'short', atM: 1810, rOhm: 0.3 }] },
  { cable: POWER_MV, lengthM: 1500, end: 'matched', features: [] },
  { cable: COAX_50, lengthM: 8, end: 'open', features: [{ kind: 'shunt', atM: 3.2, rOhm: 25 }] },
  { cable: PAIR_100, lengthM: 500, end: 'open', features: [{ kind: 'series', atM: 210, rOhm: 80 }] },
  { cable: COAX_75, lengthM: 20, end: 'matched', features: [{ kind: 'series', atM: 9, rOhm: 15 }] },
  { cable: POWER_LV, lengthM: 30, end: 'short', features: [] },
];

const NOISE = [0.001, 0.003, 0.006];
const BITS = [12, 10, 14];

/** Instrument VF settings a little off the cable's, as in the field. */
const INSTRUMENT_VF_OFFSET = [0, 0.02, -0.03];

/** `clean` drops noise and quantisation (24-bit), to check the engine on noise-free simulations too. */
export function buildSweep(opts: { clean?: boolean; noiseScale?: number } = {}): SweepCase[] {
  const out: SweepCase[] = [];
  let k = 0;
  for (const [r, route] of ROUTES.entries()) {
    for (const mode of route.modes ?? (['step', 'pulse'] as const)) {
      const scenario: Scenario = { ...route, name: `${route.cable.name}-${route.lengthM}m-${route.end}` };
      const acq = defaultAcquisition(
        scenario,
        mode,
        1000 + k,
        opts.clean ? 0 : NOISE[k % NOISE.length] * (opts.noiseScale ?? 1),
        opts.clean ? 24 : BITS[k % BITS.length],
      );
      if (k % 4 === 1) acq.impairments.offsetV = 0.03;
      if (k % 5 === 2) acq.impairments.driftV = 0.01;
      const sim = simulateScenario(scenario, acq);
      const layout = LAYOUTS[k % LAYOUTS.length];
      const instrumentVf = Math.round((route.cable.vf + INSTRUMENT_VF_OFFSET[r % 3]) * 100) / 100;
      const csv = writeLayout({
        layout,
        timeS: sim.timeS,
        volts: sim.volts,
        incidentV: sim.incidentV,
        instrumentVf,
        cableName: route.cable.name,
        z0Ohm: route.cable.z0Ohm,
      });
      out.push({
        id: `${String(k).padStart(2, '0')}-${scenario.name}-${mode}-${layout}`,
        scenario,
        acquisition: acq,
        layout,
        csv,
        expected: sim.expected,
        vf: route.cable.vf,
        z0Ohm: route.cable.z0Ohm,
      });
      k++;
    }
  }
  return out;
}

export interface CaseResult {
  id: string;
  ok: boolean;
  problems: string[];
  worstErrorM: number;
  worstErrorOfTolerance: number;
  /** Matched events whose window held the true distance, of those checked. */
  windowHits: number;
  windowChecks: number;
}

/** Distance tolerance, the product requirement: max(0.5 m, 1 % of the distance). */
export const distanceTolerance = (d: number) => Math.max(0.5, 0.01 * d);

/**
 * ρ tolerance: ±(0.05 + 20 % of |ρ|). A field reading of ρ to a few hundredths plus a
 * fifth of its size is enough to tell an open or short from a partial fault and to
 * size a joint (common practice).
 */
export const rhoTolerance = (rho: number) => 0.05 + 0.2 * Math.abs(rho);

/** Stated coverage the uncertainty windows must reach over the sweep. */
export const WINDOW_COVERAGE = 0.95;

export interface ScoredEvent {
  distanceM: number;
  type: string;
  likelyMultipleOf: number | null;
  reflectionCoefficient: number;
  windowStartM: number;
  windowEndM: number;
  /** False when the engine says its ρ was not corrected for the line's loss. */
  lossCorrected?: boolean;
}

/**
 * Where echoes of the expected events can fall: a bounce between two reflectors a and b
 * (the instrument counting as one at 0 m) returns at 2·d_b − d_a, twice at 3·d_b − 2·d_a;
 * an echo re-reflected by a mismatched instrument returns at d_a + d_b.
 */
export function echoPositions(expected: ExpectedEvent[]): number[] {
  const at = [0, ...expected.map((e) => e.distanceM)];
  const out: number[] = [];
  for (let b = 1; b < at.length; b++) {
    for (let a = 0; a < b; a++) for (let k = 1; k <= 2; k++) out.push(at[b] + k * (at[b] - at[a]));
    for (let a = 1; a <= b; a++) out.push(at[a] + at[b]);
  }
  return out;
}

/**
 * ρ against the expected one. Where the line has DC resistance and the engine says it
 * could not correct the reading for it (no loss was given and none could be estimated
 * from the record, as on a pulse record, whose echo area only the resistance lowers),
 * the reading can only be a bound: it must keep the sign and not exceed the feature's
 * size — the rule the scikit-rf reference test applies to uncorrected lossy readings.
 */
function checkRho(e: ExpectedEvent, got: number, uncorrectedLoss = false): string | null {
  const where = `${e.what} at ${e.distanceM.toFixed(2)} m`;
  if (Math.sign(got) !== Math.sign(e.rho)) return `${where} has ρ ${got.toFixed(3)}, expected the sign of ${e.rho.toFixed(3)}`;
  const tol = rhoTolerance(e.rho);
  const bound = e.rhoIsBound || uncorrectedLoss;
  if (bound ? Math.abs(got) > Math.abs(e.rho) + tol : Math.abs(got - e.rho) > tol)
    return `${where} has ρ ${got.toFixed(3)}, expected ${bound ? 'at most ' : ''}${e.rho.toFixed(3)} ± ${tol.toFixed(3)}`;
  return null;
}

/**
 * Match reported events to expected ones: every required one found within its distance
 * tolerance, with the right type, ρ sign and ρ, not flagged as an echo; its window is
 * counted for coverage. Nothing else may be reported, except echoes flagged where an
 * echo can fall.
 */
export function scoreCase(c: SweepCase, events: ScoredEvent[]): CaseResult {
  const problems: string[] = [];
  let worstErrorM = 0;
  let worstErrorOfTolerance = 0;
  let windowHits = 0;
  let windowChecks = 0;
  const used = new Set<number>();
  const matchedExpected = new Set<number>();
  for (const [k, e] of c.expected.entries()) {
    const tol = distanceTolerance(e.distanceM);
    let best = -1;
    let bestErr = Infinity;
    events.forEach((g, i) => {
      const err = Math.abs(g.distanceM - e.distanceM);
      if (!used.has(i) && err < bestErr) {
        bestErr = err;
        best = i;
      }
    });
    if (best < 0 || bestErr > tol) {
      if (e.optional) continue;
      problems.push(
        `missed ${e.what} at ${e.distanceM.toFixed(2)} m (nearest ${best < 0 ? 'none' : events[best].distanceM.toFixed(2)})`,
      );
      continue;
    }
    used.add(best);
    matchedExpected.add(k);
    const g = events[best];
    worstErrorM = Math.max(worstErrorM, bestErr);
    worstErrorOfTolerance = Math.max(worstErrorOfTolerance, bestErr / tol);
    windowChecks++;
    if (g.windowStartM <= e.distanceM && e.distanceM <= g.windowEndM) windowHits++;
    if (e.optional) continue;
    if (g.type !== e.type) problems.push(`${e.what} at ${e.distanceM.toFixed(2)} m typed ${g.type}, expected ${e.type}`);
    if (g.likelyMultipleOf !== null) problems.push(`${e.what} at ${e.distanceM.toFixed(2)} m flagged as an echo`);
    const rhoProblem = checkRho(e, g.reflectionCoefficient, g.lossCorrected === false && c.scenario.cable.rdcOhmPerM > 0);
    if (rhoProblem) problems.push(rhoProblem);
  }
  const echoes = echoPositions(c.expected);
  // An optional feature (one too weak to require) may be missed; so it may also be reported less
  // precisely than a required one must be, as long as the reported window holds it and ρ has its
  // sign: that tells the crew more than missing it, and is not a phantom.
  const optionalLeft = c.expected.filter((e, k) => e.optional && !matchedExpected.has(k));
  events.forEach((g, i) => {
    if (used.has(i)) return;
    const loose = optionalLeft.findIndex(
      (e) => g.likelyMultipleOf === null && g.windowStartM <= e.distanceM && e.distanceM <= g.windowEndM && Math.sign(g.reflectionCoefficient) === Math.sign(e.rho),
    );
    if (loose >= 0) {
      optionalLeft.splice(loose, 1);
      windowChecks++;
      windowHits++;
      return;
    }
    if (g.likelyMultipleOf === null) problems.push(`false event ${g.type} at ${g.distanceM.toFixed(2)} m`);
    else if (!echoes.some((d) => Math.abs(g.distanceM - d) <= 2 * distanceTolerance(d)))
      problems.push(`${g.type} at ${g.distanceM.toFixed(2)} m flagged as an echo where none can fall`);
  });
  return { id: c.id, ok: problems.length === 0, problems, worstErrorM, worstErrorOfTolerance, windowHits, windowChecks };
}
