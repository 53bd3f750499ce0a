/**
 * Scoring the engine on a set of the second simulator's traces.
 *
 * Per required event (matched to the nearest unused reported event, pairs
 * taken in order of distance error):
 *  - found: distance within max(0.5 m, 1 % of the distance);
 *  - type: the expected type (or one it lists in alsoAccept); where ρ cannot
 *    be read (rhoCheck false) any type of the right sign;
 *  - sign of ρ;
 *  - ρ: within max(0.1, 25 % of |ρ|) of the range between the local ρ and
 *    the lossless ρ seen at the port (through earlier features and the
 *    source mismatch); an engine may report either. The loss-corrected
 *    figure is used when the engine gives one (reflectionCoefficientCorrected);
 *  - window: the truth inside [windowStartM, windowEndM];
 *  - not flagged as a multiple (likelyMultipleOf null).
 * Optional events may be reported or not; a report matched to one is neither
 * checked nor false.
 * Every other reported event is false, except a multiple reflection that the
 * engine flags as one: it must lie within max(tolerance, the launch's length)
 * of a multiple the lattice predicts and carry likelyMultipleOf. A multiple
 * reported unflagged counts as a false event.
 * A trace passes when it has no problem of any kind.
 */
import type { Sim2Case } from './cases';

export interface ReportedEvent {
  distanceM: number;
  type: string;
  reflectionCoefficient: number;
  reflectionCoefficientCorrected?: number | null;
  windowStartM: number;
  windowEndM: number;
  likelyMultipleOf: number | null;
}

export interface CaseScore {
  id: string;
  passed: boolean;
  threw?: string;
  required: number;
  found: number;
  typeRight: number;
  signRight: number;
  rhoChecked: number;
  rhoRight: number;
  windowHeld: number;
  flaggedAsEcho: number;
  falseEvents: number;
  echoesUnflagged: number;
  problems: string[];
  /** Signed distance errors of found required events, as a fraction of their distance. */
  relErrors: number[];
}

const C0 = 299_792_458;
const tolerance = (d: number) => Math.max(0.5, 0.01 * d);
export const rhoTolerance = (rho: number) => Math.max(0.1, 0.25 * Math.abs(rho));
const sameSign = (t: string, u: string) =>
  (['open', 'impedance-rise'].includes(t) && ['open', 'impedance-rise'].includes(u)) ||
  (['short', 'impedance-drop'].includes(t) && ['short', 'impedance-drop'].includes(u));

export function scoreCase(c: Sim2Case, events: ReportedEvent[] | null, threw?: string): CaseScore {
  const s: CaseScore = {
    id: c.id,
    passed: false,
    required: c.expected.filter((e) => e.required).length,
    found: 0,
    typeRight: 0,
    signRight: 0,
    rhoChecked: 0,
    rhoRight: 0,
    windowHeld: 0,
    flaggedAsEcho: 0,
    falseEvents: 0,
    echoesUnflagged: 0,
    problems: [],
    relErrors: [],
  };
  if (!events) {
    s.threw = threw ?? 'no result';
    s.problems.push(`threw: ${s.threw}`);
    return s;
  }
  const pairs: Array<{ e: number; g: number; err: number }> = [];
  c.expected.forEach((e, i) =>
    events.forEach((g, j) => {
      const err = Math.abs(g.distanceM - e.distanceM);
      if (err <= tolerance(e.distanceM)) pairs.push({ e: i, g: j, err });
    }),
  );
  pairs.sort((a, b) => a.err - b.err || (c.expected[a.e].required ? -1 : 1));
  const eUsed = new Map<number, number>();
  const gUsed = new Set<number>();
  for (const p of pairs) {
    if (eUsed.has(p.e) || gUsed.has(p.g)) continue;
    eUsed.set(p.e, p.g);
    gUsed.add(p.g);
  }
  c.expected.forEach((e, i) => {
    if (!e.required) return;
    const at = `${e.what} at ${e.distanceM.toFixed(2)} m`;
    const j = eUsed.get(i);
    if (j === undefined) {
      const near = events.reduce<ReportedEvent | null>(
        (b, g) => (!b || Math.abs(g.distanceM - e.distanceM) < Math.abs(b.distanceM - e.distanceM) ? g : b),
        null,
      );
      s.problems.push(`missed ${at} (nearest ${near ? near.distanceM.toFixed(2) + ' m' : 'none'})`);
      return;
    }
    const g = events[j];
    s.found++;
    s.relErrors.push((g.distanceM - e.distanceM) / e.distanceM);
    const typeOk =
      g.type === e.type || (e.alsoAccept ?? []).includes(g.type as never) || (!e.rhoCheck && sameSign(g.type, e.type));
    if (typeOk) s.typeRight++;
    else s.problems.push(`${at} typed ${g.type}, expected ${e.type}`);
    const rho = g.reflectionCoefficientCorrected ?? g.reflectionCoefficient;
    if (Math.sign(rho) === Math.sign(e.rho)) s.signRight++;
    else s.problems.push(`${at}: ρ ${rho.toFixed(3)} has the wrong sign (expected ${e.rho.toFixed(3)})`);
    if (e.rhoCheck) {
      s.rhoChecked++;
      const tol = rhoTolerance(e.rho);
      const lo = Math.min(e.rho, e.rhoSeen) - tol;
      const hi = Math.max(e.rho, e.rhoSeen) + tol;
      if (rho >= lo && rho <= hi) s.rhoRight++;
      else s.problems.push(`${at}: ρ ${rho.toFixed(3)} outside ${lo.toFixed(3)}…${hi.toFixed(3)}`);
    }
    if (g.windowStartM <= e.distanceM && e.distanceM <= g.windowEndM) s.windowHeld++;
    else s.problems.push(`${at}: window ${g.windowStartM.toFixed(2)}–${g.windowEndM.toFixed(2)} m misses it`);
    if (g.likelyMultipleOf !== null) {
      s.flaggedAsEcho++;
      s.problems.push(`${at} flagged as a multiple`);
    }
  });
  const edgeM = (((c.pulseWidthNs ?? 0) + 2 * c.riseTimeNs) * 1e-9 * c.vf * C0) / 2;
  events.forEach((g, j) => {
    if (gUsed.has(j)) return;
    const echo = c.echoes.find((x) => Math.abs(x.distanceM - g.distanceM) <= Math.max(tolerance(x.distanceM), edgeM));
    if (echo && g.likelyMultipleOf !== null) return;
    s.falseEvents++;
    if (echo) {
      s.echoesUnflagged++;
      s.problems.push(`multiple at ${g.distanceM.toFixed(2)} m reported as ${g.type}, not flagged`);
    } else
      s.problems.push(
        `false event ${g.type} at ${g.distanceM.toFixed(2)} m${g.likelyMultipleOf !== null ? ' (flagged as a multiple)' : ''}`,
      );
  });
  s.passed = s.problems.length === 0;
  return s;
}

export interface Tally {
  traces: number;
  passed: number;
  required: number;
  found: number;
  typeRight: number;
  signRight: number;
  rhoChecked: number;
  rhoRight: number;
  windowHeld: number;
  flaggedAsEcho: number;
  falseEvents: number;
  tracesWithoutFalse: number;
  threw: number;
}

export function tally(scores: CaseScore[]): Tally {
  const t: Tally = {
    traces: scores.length,
    passed: 0,
    required: 0,
    found: 0,
    typeRight: 0,
    signRight: 0,
    rhoChecked: 0,
    rhoRight: 0,
    windowHeld: 0,
    flaggedAsEcho: 0,
    falseEvents: 0,
    tracesWithoutFalse: 0,
    threw: 0,
  };
  for (const s of scores) {
    if (s.passed) t.passed++;
    if (s.threw) t.threw++;
    t.required += s.required;
    t.found += s.found;
    t.typeRight += s.typeRight;
    t.signRight += s.signRight;
    t.rhoChecked += s.rhoChecked;
    t.rhoRight += s.rhoRight;
    t.windowHeld += s.windowHeld;
    t.flaggedAsEcho += s.flaggedAsEcho;
    t.falseEvents += s.falseEvents;
    if (s.falseEvents === 0 && !s.threw) t.tracesWithoutFalse++;
  }
  return t;
}

const pct = (a: number, b: number) => (b ? `${((100 * a) / b).toFixed(1)} %` : '—');

export function formatTally(label: string, t: Tally): string {
  return [
    `${label}: ${t.passed}/${t.traces} traces passed`,
    `required events found ${t.found}/${t.required}`,
    `type ${t.typeRight}/${t.found}`,
    `ρ ${t.rhoRight}/${t.rhoChecked}`,
    `false events ${t.falseEvents}`,
    `traces with no false event ${pct(t.tracesWithoutFalse, t.traces)}`,
    `window coverage ${pct(t.windowHeld, t.found)}`,
    ...(t.flaggedAsEcho ? [`faults flagged as multiples ${t.flaggedAsEcho}`] : []),
    ...(t.threw ? [`threw ${t.threw}`] : []),
  ].join('; ');
}
