import { Op, type Transaction } from 'sequelize';
import { describeRoutePosition, metresText, routePosition, type RoutePosition } from '../../shared/field/route-position';
import { anchorsOf, placeOnGround } from '../../shared/locate/route-geo';
import {
  fuseEstimates,
  LocateInputError,
  singleEndedTdr,
  timingUncertaintyNs,
  twoEndedTdr,
  window95,
  type CableRunInput,
  type LocationEstimate,
} from '../../shared/locate';
import type { BestLocationView, LocationMethodView, MeasurementReadings } from '../../shared/schemas/measurements';
import { COVERAGE_FACTOR } from '../../shared/trace/uncertainty';
import { CableRun, Finding, Measurement, RouteMarker, Ticket, TicketCloseout, TicketFinding, Trace } from '../db/models';
import { INSTALLED_LENGTH_RELATIVE_U, measurementEstimate, runInput } from '../measurements/measurement-estimate';

/** Readings of the same fault: within this of each other, beyond their own uncertainties (as the two-ended pairing does). */
function sameFaultToleranceM(installedLengthM: number) {
  return Math.max(5, 0.05 * installedLengthM);
}

/** Whether two confirmed findings on one run are readings of the same fault (the pairing the best location uses). */
export function sameFault(a: Pick<Finding, 'distanceFromAM' | 'uncertaintyM'>, b: Pick<Finding, 'distanceFromAM' | 'uncertaintyM'>, installedLengthM: number) {
  return Math.abs(a.distanceFromAM - b.distanceFromAM) <= sameFaultToleranceM(installedLengthM) + a.uncertaintyM + b.uncertaintyM;
}

/**
 * When each finding's fault was recorded as repaired: the last close-out of a
 * ticket the finding is on that stands fixed or signed off (a ticket reopened
 * as not fixed records no repair). Milliseconds; absent when not repaired.
 */
export async function repairTimes(findingIds: number[], transaction?: Transaction): Promise<Map<number, number>> {
  const out = new Map<number, number>();
  if (findingIds.length === 0) return out;
  const links = await TicketFinding.findAll({ where: { findingId: findingIds }, attributes: ['ticketId', 'findingId'], transaction });
  if (links.length === 0) return out;
  const fixed = await Ticket.findAll({ where: { id: [...new Set(links.map((l) => l.ticketId))], status: ['fixed', 'signed-off'] }, attributes: ['id'], transaction });
  if (fixed.length === 0) return out;
  const closeouts = await TicketCloseout.findAll({ where: { ticketId: fixed.map((t) => t.id) }, attributes: ['ticketId', 'createdAt'], transaction });
  const closedAt = new Map<number, number>();
  for (const c of closeouts) closedAt.set(c.ticketId, Math.max(closedAt.get(c.ticketId) ?? 0, c.createdAt.getTime()));
  for (const l of links) {
    const at = closedAt.get(l.ticketId);
    if (at !== undefined) out.set(l.findingId, Math.max(out.get(l.findingId) ?? 0, at));
  }
  return out;
}

/**
 * Whether a repair of the fault near them (`repairs`: when readings of it were
 * closed out) was recorded between two findings' confirmations: the later one
 * read the cable after the repair, so it is a new fault (or the repair did not
 * hold), not another reading of the old one.
 */
export function repairedBetween(a: Pick<Finding, 'confirmedAt'>, b: Pick<Finding, 'confirmedAt'>, repairs: Iterable<number>): boolean {
  const lo = Math.min(a.confirmedAt.getTime(), b.confirmedAt.getTime());
  const hi = Math.max(a.confirmedAt.getTime(), b.confirmedAt.getTime());
  for (const at of repairs) if (at > lo && at < hi) return true;
  return false;
}

/**
 * For each finding, by id, the ids of the confirmed findings on its run that
 * read the same fault, itself included (only itself when it is not confirmed).
 * A fixed number of queries however many findings are asked about: the runs and
 * their confirmed findings are read once, and the repairs of all the near ones together.
 */
export async function sameFaultFindingIdsOf(findings: Finding[], transaction?: Transaction): Promise<Map<number, number[]>> {
  const out = new Map<number, number[]>(findings.map((f) => [f.id, [f.id]]));
  const confirmed = findings.filter((f) => f.status === 'confirmed');
  if (confirmed.length === 0) return out;
  const runIds = [...new Set(confirmed.map((f) => f.cableRunId))];
  const [runs, others] = await Promise.all([
    CableRun.findAll({ where: { id: runIds }, attributes: ['id', 'installedLengthM'], transaction }),
    Finding.findAll({ where: { cableRunId: runIds, status: 'confirmed' }, attributes: ['id', 'cableRunId', 'distanceFromAM', 'uncertaintyM', 'confirmedAt'], transaction }),
  ]);
  const lengths = new Map(runs.map((r) => [r.id, r.installedLengthM]));
  const nearOf = new Map<number, Finding[]>();
  for (const f of confirmed) {
    const length = lengths.get(f.cableRunId);
    if (length === undefined) continue;
    nearOf.set(f.id, others.filter((o) => o.cableRunId === f.cableRunId && (o.id === f.id || sameFault(o, f, length))));
  }
  // A finding's repair time does not depend on which others it is read with: one read serves every row.
  const repaired = await repairTimes([...new Set([...nearOf.values()].flat().map((o) => o.id))], transaction);
  for (const f of confirmed) {
    const near = nearOf.get(f.id);
    if (!near) continue;
    const repairs = near.filter((o) => repaired.has(o.id)).map((o) => repaired.get(o.id)!);
    out.set(f.id, near.filter((o) => o.id === f.id || !repairedBetween(o, f, repairs)).map((o) => o.id));
  }
  return out;
}

interface TdrReading {
  finding: Finding;
  trace: Trace;
}

interface Source {
  estimate: LocationEstimate;
  findingId: number | null;
  traceId: number | null;
  measurementId: number | null;
}

/**
 * Confirmed TDR findings on the run that are this fault (the finding itself and
 * those near it), one per stored file: a re-analysis of the same file repeats
 * its information.
 */
async function sameFaultReadings(f: Finding, run: CableRun, transaction?: Transaction): Promise<TdrReading[]> {
  const candidates = await Finding.findAll({ where: { cableRunId: run.id, status: 'confirmed' }, order: [['id', 'ASC']], transaction });
  const close = candidates.filter((o) => o.id === f.id || sameFault(o, f, run.installedLengthM));
  const repairs = [...(await repairTimes(close.map((o) => o.id), transaction)).values()];
  const near = close.filter((o) => o.id === f.id || !repairedBetween(o, f, repairs));
  const traces = await Trace.findAll({ where: { id: near.map((o) => o.traceId) }, transaction });
  const byFile = new Map<string, TdrReading>();
  for (const finding of near) {
    const trace = traces.find((t) => t.id === finding.traceId);
    if (!trace) continue;
    const kept = byFile.get(trace.sha256);
    // Keep the finding on the latest analysis of a file, and the asked-for one over others.
    if (!kept || finding.id === f.id || (kept.finding.id !== f.id && trace.id > kept.trace.id))
      byFile.set(trace.sha256, { finding, trace });
  }
  return [...byFile.values()];
}

/**
 * A reading's uncertainties as the fusion takes them (standard uncertainties). The engine states
 * a finding's uncertaintyM as the expanded half-width of its 95 % window (k = COVERAGE_FACTOR), and
 * the library's VF tolerance as the half-width of a rectangular range (u = T/√3, JCGM 100:2008
 * §4.3.7), as in shared/trace/uncertainty.ts; taking either as a standard uncertainty would widen
 * the fused window about twofold over the reading's own.
 */
const standardOfReading = (r: TdrReading) => r.finding.uncertaintyM / COVERAGE_FACTOR;
const vfRelativeStandard = (r: TdrReading) => r.trace.vfTolerance / Math.sqrt(3);

function singleEnded(r: TdrReading, run: CableRun, runIn: CableRunInput): LocationEstimate {
  return singleEndedTdr(`finding-${r.finding.id}`, runIn, {
    fromEnd: r.trace.end,
    distanceM: r.finding.distanceM,
    standardUncertaintyM: standardOfReading(r),
    vfRelativeU: vfRelativeStandard(r),
    // Readings with the same library VF on the same cable share its error.
    vfSource: `vf:cable-type-${run.cableTypeId}:${r.trace.vf}`,
    timingSource: `round-trip:trace-${r.trace.id}`,
    label: `TDR from end ${r.trace.end} (finding ${r.finding.id})`,
  });
}

/** The A and B readings closest to each other, the asked-for finding's own end first. */
function closestPair(readings: TdrReading[], f: Finding): [TdrReading, TdrReading] | null {
  let best: [TdrReading, TdrReading] | null = null;
  let bestGap = Infinity;
  for (const a of readings.filter((r) => r.trace.end === 'A'))
    for (const b of readings.filter((r) => r.trace.end === 'B')) {
      const involvesF = a.finding.id === f.id || b.finding.id === f.id ? 0 : 1;
      const gap = involvesF * 1e9 + Math.abs(a.finding.distanceFromAM - b.finding.distanceFromAM);
      if (gap < bestGap) {
        bestGap = gap;
        best = [a, b];
      }
    }
  return best;
}

function methodView(m: ReturnType<typeof fuseEstimates>['methods'][number], source: Source | undefined): LocationMethodView {
  return {
    id: m.id,
    method: m.method,
    label: m.label,
    fromEnd: m.fromEnd,
    distanceFromEndM: m.distanceFromEndM,
    distanceFromAM: m.distanceFromAM,
    standardUncertaintyM: m.standardUncertaintyM,
    windowStartM: m.windowStartM,
    windowEndM: m.windowEndM,
    used: m.used,
    weight: m.weight,
    normalisedResidual: m.normalisedResidual,
    findingId: source?.findingId ?? null,
    traceId: source?.traceId ?? null,
    measurementId: source?.measurementId ?? null,
    note: m.notes.length ? m.notes.join('; ') : null,
  };
}

/** The best location on the ground, from the markers that carry coordinates; or why there is none. */
function groundOf(pos: RoutePosition | null, markers: RouteMarker[]): Pick<BestLocationView, 'ground' | 'groundNote'> {
  const onMap = markers.map((m) => ({ label: m.label, chainageM: m.chainageM, latitude: m.latitude ?? null, longitude: m.longitude ?? null }));
  const anchors = anchorsOf(onMap);
  if (!pos) return { ground: null, groundNote: null };
  if (anchors.length < 2) {
    return {
      ground: null,
      groundNote:
        anchors.length === 0
          ? 'No route marker of this run has coordinates, so no position on the map is estimated.'
          : 'Only one route marker of this run has coordinates; a position on the map needs one on each side of the fault.',
    };
  }
  const ground = placeOnGround(onMap, pos);
  return ground
    ? { ground, groundNote: null }
    : {
        ground: null,
        groundNote: `The location is outside the stretch between ${anchors[0].label} and ${anchors[anchors.length - 1].label}, the first and last markers with coordinates; add coordinates to a marker beyond it (or at the end).`,
      };
}

/**
 * A confirmed finding's best location from every reading of the same fault:
 * its TDR readings from both ends (as one two-ended reading when there is a
 * pair, which is free of the VF), and the bridge, capacitance and resistance
 * measurements recorded on those findings, fused by shared/locate. Null for a
 * finding that is not a confirmed fault.
 */
export async function bestLocationFor(findingId: number, transaction?: Transaction): Promise<BestLocationView | null> {
  const f = await Finding.findByPk(findingId, { transaction });
  if (!f || f.status !== 'confirmed') return null;
  const run = (await CableRun.findByPk(f.cableRunId, { transaction }))!;
  const runIn: CableRunInput = runInput(run);
  const sources: Source[] = [];
  const shownOnly: LocationMethodView[] = [];
  const excluded: BestLocationView['excluded'] = [];
  const tryAdd = (
    label: string,
    ids: { findingId: number | null; traceId: number | null; measurementId: number | null },
    build: () => LocationEstimate,
  ) => {
    try {
      sources.push({ estimate: build(), ...ids });
    } catch (err) {
      if (!(err instanceof LocateInputError)) throw err;
      excluded.push({ label, findingId: ids.findingId, measurementId: ids.measurementId, reason: err.message });
    }
  };

  const readings = await sameFaultReadings(f, run, transaction);
  const pair = closestPair(readings, f);
  let pairUsed = false;
  if (pair) {
    const [a, b] = pair;
    const before = sources.length;
    tryAdd('TDR from both ends', { findingId: a.finding.id, traceId: null, measurementId: null }, () =>
      twoEndedTdr(`two-ended-${a.finding.id}-${b.finding.id}`, runIn, {
        roundTripANs: a.finding.roundTripNs,
        roundTripBNs: b.finding.roundTripNs,
        roundTripAUNs: timingUncertaintyNs(a.finding.distanceM, standardOfReading(a), a.trace.vf, vfRelativeStandard(a)),
        roundTripBUNs: timingUncertaintyNs(b.finding.distanceM, standardOfReading(b), b.trace.vf, vfRelativeStandard(b)),
        label: `TDR from both ends (findings ${a.finding.id} and ${b.finding.id})`,
      }),
    );
    pairUsed = sources.length > before;
  }
  for (const r of readings) {
    const ids = { findingId: r.finding.id, traceId: r.trace.id, measurementId: null };
    const inPair = pairUsed && (pair![0] === r || pair![1] === r);
    if (!inPair) {
      tryAdd(`TDR from end ${r.trace.end} (finding ${r.finding.id})`, ids, () => singleEnded(r, run, runIn));
      continue;
    }
    // Shown beside the two-ended reading it went into, not counted twice.
    try {
      const e = singleEnded(r, run, runIn);
      shownOnly.push({
        ...methodView(
          {
            ...e,
            ...window95(e.distanceFromAM, e.standardUncertaintyM, run.installedLengthM),
            used: false,
            weight: null,
            normalisedResidual: null,
          },
          { estimate: e, ...ids },
        ),
        note: 'counted through the two-ended reading',
      });
    } catch (err) {
      if (!(err instanceof LocateInputError)) throw err;
    }
  }

  const measurements = await Measurement.findAll({
    where: { findingId: { [Op.in]: readings.map((r) => r.finding.id) }, status: 'active' },
    order: [['id', 'ASC']],
    transaction,
  });
  for (const m of measurements) {
    const ids = { findingId: m.findingId, traceId: null, measurementId: m.id };
    tryAdd(`measurement ${m.id}`, ids, () =>
      measurementEstimate({ kind: m.kind, readings: m.readings, id: m.id } as MeasurementReadings & { id: number }, runIn),
    );
  }
  if (sources.length === 0) return null;

  const fused = fuseEstimates(
    sources.map((s) => s.estimate),
    run.installedLengthM,
  );
  const markers = await RouteMarker.findAll({ where: { cableRunId: run.id }, transaction });
  const pos =
    fused.distanceFromAM === null
      ? null
      : routePosition(
          { installedLengthM: run.installedLengthM, endALabel: run.endALabel, endBLabel: run.endBLabel, markers },
          'A',
          fused.distanceFromAM,
          { startM: fused.windowStartM!, endM: fused.windowEndM! },
        );
  return {
    distanceFromAM: fused.distanceFromAM,
    standardUncertaintyM: fused.standardUncertaintyM,
    windowStartM: fused.windowStartM,
    windowEndM: fused.windowEndM,
    coverageFactor: fused.coverageFactor,
    consistent: fused.consistent,
    ...(fused.outlier
      ? {
          outlier: {
            methodId: fused.outlier.id,
            label: fused.outlier.label,
            offsetM: fused.outlier.offsetM,
            sigmas: fused.outlier.sigmas,
          },
        }
      : {}),
    verdict: fused.verdict,
    checks: fused.checks,
    test: fused.test && {
      chiSquare: fused.test.statistic,
      degreesOfFreedom: fused.test.degreesOfFreedom,
      limit95: fused.test.limit95,
      birgeRatio: fused.test.birgeRatio,
    },
    methods: [
      ...fused.methods.map((m) =>
        methodView(
          m,
          sources.find((s) => s.estimate.id === m.id),
        ),
      ),
      ...shownOnly,
    ],
    excluded,
    routePosition: pos,
    routePositionText: pos ? describeRoutePosition(pos, metresText) : null,
    ...groundOf(pos, markers),
    assumptions: [
      `installed length ${run.installedLengthM} m known to ±${(INSTALLED_LENGTH_RELATIVE_U * run.installedLengthM).toFixed(1)} m ` +
        `(${INSTALLED_LENGTH_RELATIVE_U * 100} %, standard uncertainty)`,
    ],
  };
}
