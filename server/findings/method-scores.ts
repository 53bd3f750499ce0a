import type { Transaction } from 'sequelize';
import { SCORED_METHOD_LABELS, type MethodAccuracyRow, type MethodScoreView, type ScoredMethod } from '../../shared/schemas/method-scores';
import { CableType, MethodScore, Ticket, type TicketCloseout } from '../db/models';
import { bestLocationFor } from './best-location';

/**
 * Scores every method's estimate of a closed-out fault, and the best location
 * itself, against where the crew found it, inside the close-out's transaction.
 * Each row keeps the estimate and window as they stood, so later readings or
 * a changed library do not rewrite history.
 */
export async function scoreMethodsAtCloseout(closeout: TicketCloseout, installedLengthM: number, transaction: Transaction) {
  const best = await bestLocationFor(closeout.findingId, transaction);
  if (!best) return [];
  const foundFromAM = closeout.foundFromAM;
  const fromEndOf = (end: 'A' | 'B', fromAM: number) => (end === 'A' ? fromAM : installedLengthM - fromAM);
  const base = {
    closeoutId: closeout.id,
    ticketId: closeout.ticketId,
    findingId: closeout.findingId,
    cableTypeId: closeout.cableTypeId,
    foundFromAM,
  };
  const rows = best.methods.map((m) => ({
    ...base,
    measurementId: m.measurementId,
    method: m.method as ScoredMethod,
    label: m.label,
    fromEnd: m.fromEnd,
    used: m.used,
    locatedFromAM: m.distanceFromAM,
    locatedFromEndM: m.distanceFromEndM,
    standardUncertaintyM: m.standardUncertaintyM,
    windowStartM: m.windowStartM,
    windowEndM: m.windowEndM,
    foundFromEndM: fromEndOf(m.fromEnd, foundFromAM),
    errorM: m.distanceFromEndM - fromEndOf(m.fromEnd, foundFromAM),
    withinWindow: foundFromAM >= m.windowStartM && foundFromAM <= m.windowEndM,
  }));
  if (best.distanceFromAM !== null && best.standardUncertaintyM !== null) {
    rows.push({
      ...base,
      measurementId: null,
      method: 'best-location',
      label: SCORED_METHOD_LABELS['best-location'],
      fromEnd: 'A',
      used: true,
      locatedFromAM: best.distanceFromAM,
      locatedFromEndM: best.distanceFromAM,
      standardUncertaintyM: best.standardUncertaintyM,
      windowStartM: best.windowStartM!,
      windowEndM: best.windowEndM!,
      foundFromEndM: foundFromAM,
      errorM: best.distanceFromAM - foundFromAM,
      withinWindow: foundFromAM >= best.windowStartM! && foundFromAM <= best.windowEndM!,
    });
  }
  await MethodScore.bulkCreate(rows, { transaction });
  return rows;
}

export function methodScoreView(s: MethodScore): MethodScoreView {
  return {
    method: s.method,
    label: s.label,
    fromEnd: s.fromEnd,
    used: s.used,
    locatedFromEndM: s.locatedFromEndM,
    standardUncertaintyM: s.standardUncertaintyM,
    foundFromEndM: s.foundFromEndM,
    errorM: s.errorM,
    withinWindow: s.withinWindow,
  };
}

/** The scores of a close-out, the best location first. */
export async function scoresOfCloseout(closeoutId: number): Promise<MethodScoreView[]> {
  const rows = await MethodScore.findAll({ where: { closeoutId }, order: [['id', 'ASC']] });
  return rows.map(methodScoreView).sort((a, b) => Number(b.method === 'best-location') - Number(a.method === 'best-location'));
}

const ORDER = Object.keys(SCORED_METHOD_LABELS) as ScoredMethod[];

/** One row of the accuracy table: a method's errors on one cable type (or on all), however many close-outs there are. */
export function summarise(
  method: ScoredMethod,
  cableType: MethodAccuracyRow['cableType'],
  rows: Pick<MethodScore, 'errorM' | 'withinWindow'>[],
): MethodAccuracyRow {
  const errors = rows.map((r) => r.errorM);
  return {
    method,
    label: SCORED_METHOD_LABELS[method],
    cableType,
    count: rows.length,
    meanErrorM: errors.reduce((s, e) => s + e, 0) / rows.length,
    meanAbsErrorM: errors.reduce((s, e) => s + Math.abs(e), 0) / rows.length,
    // Folded, not spread into Math.max: a spread of some hundred thousand values overflows the call stack.
    maxAbsErrorM: errors.reduce((m, e) => Math.max(m, Math.abs(e)), 0),
    withinWindow: rows.filter((r) => r.withinWindow).length,
  };
}

/**
 * Located against found per method: first every cable type together, then
 * each cable type, from the latest close-out of each ticket that was not
 * withdrawn (as the dashboard's per-cable-type figures).
 */
export async function methodAccuracy(): Promise<MethodAccuracyRow[]> {
  const scores = await MethodScore.findAll({ order: [['id', 'DESC']] });
  if (scores.length === 0) return [];
  const withdrawn = new Set((await Ticket.findAll({ where: { status: 'withdrawn' }, attributes: ['id'] })).map((t) => t.id));
  const latestCloseout = new Map<number, number>();
  for (const s of scores) if (!latestCloseout.has(s.ticketId)) latestCloseout.set(s.ticketId, s.closeoutId);
  const kept = scores.filter((s) => !withdrawn.has(s.ticketId) && latestCloseout.get(s.ticketId) === s.closeoutId);
  const types = await CableType.findAll({ where: { id: [...new Set(kept.map((s) => s.cableTypeId))] }, attributes: ['id', 'name'] });
  const out: MethodAccuracyRow[] = [];
  for (const method of ORDER) {
    const ofMethod = kept.filter((s) => s.method === method);
    if (ofMethod.length === 0) continue;
    out.push(summarise(method, null, ofMethod));
    for (const t of [...types].sort((a, b) => a.name.localeCompare(b.name))) {
      const ofType = ofMethod.filter((s) => s.cableTypeId === t.id);
      if (ofType.length) out.push(summarise(method, { id: t.id, name: t.name }, ofType));
    }
  }
  return out;
}
