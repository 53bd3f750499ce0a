import { can } from '../../shared/auth/permissions';
import type { ArchivedTraceView, TraceArchiveView, TraceOutcomeKind } from '../../shared/schemas/trace-outcomes';
import type { Page } from '../../shared/schemas/users';
import { Op } from 'sequelize';
import type { SessionUser } from '../auth/guards';
import { CableRun, Finding, Site, Trace, TraceArchiveEvent, TraceOutcome, User } from '../db/models';
import { AppError } from '../errors';
import { pendingConflict } from '../traces/traces.service';

const person = (u: User | undefined, id: number) => ({ id, name: u?.name ?? `user ${id}` });
const BY = [{ association: 'by', attributes: ['id', 'name'] }];
const OUTCOME_WORDS: Record<TraceOutcomeKind, string> = { 'far-end-healthy': 'far end of a healthy cable', 'calibration-filed': 'field calibration filed' };

export async function archiveView(traceId: number): Promise<TraceArchiveView> {
  const trace = await Trace.findByPk(traceId, { attributes: ['id', 'archivedAt'] });
  if (!trace) throw AppError.notFound(`Trace ${traceId}`);
  const rows = await TraceArchiveEvent.findAll({ where: { traceId }, include: BY, order: [['id', 'ASC']] });
  return {
    traceId,
    archived: trace.archivedAt !== null,
    archivedAt: trace.archivedAt ? new Date(trace.archivedAt).toISOString() : null,
    history: rows.map((r) => ({ id: r.id, action: r.action, reason: r.reason, by: person(r.by, r.byId), createdAt: new Date(r.createdAt).toISOString() })),
  };
}

/**
 * Archive a junk or unreadable trace: it stays stored (file, row, analysis)
 * but leaves the lists. Its uploader may archive it, or anyone allowed to
 * archive others' traces. A trace behind a finding, or a run's reference, is
 * part of the record and is not archived; a trace still being analysed is
 * archived once its analysis is in (409 `trace_pending`).
 */
export async function archiveTrace(traceId: number, reason: string, user: SessionUser): Promise<TraceArchiveView> {
  await Trace.sequelize!.transaction(async (transaction) => {
    // Held while the checks run, so that an outcome recorded at the same time waits for this and then sees it archived.
    const trace = await Trace.findByPk(traceId, { transaction, lock: transaction.LOCK.UPDATE });
    if (!trace) throw AppError.notFound(`Trace ${traceId}`);
    if (trace.uploadedById !== user.id && !can(user.role, 'traces:archive')) {
      throw new AppError(403, 'not_your_trace', `Someone else uploaded trace ${traceId}: they or a supervisor may archive it.`);
    }
    if (trace.archivedAt) throw AppError.conflict('already_archived', `Trace ${traceId} is already archived.`);
    // Its background analysis would still run and write to it: it is archived once that is done.
    if (trace.status === 'pending') throw pendingConflict(traceId, 'archived');
    if (trace.isReference) {
      throw AppError.conflict('is_reference', `Trace ${traceId} is the reference for end ${trace.end} of its run: stop using it as the reference before archiving it.`);
    }
    const finding = await Finding.findOne({ where: { traceId }, attributes: ['id'], transaction });
    if (finding) {
      throw AppError.conflict('has_findings', `Finding ${finding.id} was made from trace ${traceId}, so the trace stays in the lists as part of that record.`);
    }
    // A recorded outcome (the run's measured length, a filed calibration) rests on the trace as a finding does.
    const outcome = await TraceOutcome.findOne({ where: { traceId }, attributes: ['id', 'kind'], order: [['id', 'ASC']], transaction });
    if (outcome) {
      throw AppError.conflict('has_outcomes', `Trace ${traceId} holds a recorded outcome (${OUTCOME_WORDS[outcome.kind]}), so it stays in the lists as part of that record.`);
    }
    await trace.update({ archivedAt: new Date() }, { transaction });
    await TraceArchiveEvent.create({ traceId, action: 'archived', reason, byId: user.id }, { transaction });
  });
  return archiveView(traceId);
}

/** Put an archived trace back in the lists, with a reason; the history keeps both steps. */
export async function restoreTrace(traceId: number, reason: string, user: SessionUser): Promise<TraceArchiveView> {
  await Trace.sequelize!.transaction(async (transaction) => {
    // Held while the checks run, so that an outcome recorded at the same time waits for this and then sees it archived.
    const trace = await Trace.findByPk(traceId, { transaction, lock: transaction.LOCK.UPDATE });
    if (!trace) throw AppError.notFound(`Trace ${traceId}`);
    if (!trace.archivedAt) throw AppError.conflict('not_archived', `Trace ${traceId} is not archived.`);
    await trace.update({ archivedAt: null }, { transaction });
    await TraceArchiveEvent.create({ traceId, action: 'restored', reason, byId: user.id }, { transaction });
  });
  return archiveView(traceId);
}

/** Archived traces, most recently archived first, with who archived each and why. */
export async function listArchived(page: number, pageSize: number): Promise<Page<ArchivedTraceView>> {
  const { rows, count } = await Trace.findAndCountAll({
    where: { archivedAt: { [Op.ne]: null } },
    order: [
      ['archivedAt', 'DESC'],
      ['id', 'DESC'],
    ],
    limit: pageSize,
    offset: (page - 1) * pageSize,
  });
  if (!rows.length) return { items: [], total: count, page, pageSize };
  const ids = rows.map((t) => t.id);
  const runs = await CableRun.findAll({ where: { id: [...new Set(rows.map((t) => t.cableRunId))] } });
  const sites = await Site.findAll({ where: { id: [...new Set(runs.map((r) => r.siteId))] } });
  const uploaders = await User.findAll({ where: { id: [...new Set(rows.map((t) => t.uploadedById))] }, attributes: ['id', 'name'] });
  const events = await TraceArchiveEvent.findAll({ where: { traceId: ids, action: 'archived' }, include: BY, order: [['id', 'DESC']] });
  const items = rows.map((t) => {
    const run = runs.find((r) => r.id === t.cableRunId)!;
    const last = events.find((e) => e.traceId === t.id);
    return {
      id: t.id,
      originalName: t.originalName,
      siteName: sites.find((s) => s.id === run.siteId)?.name ?? '',
      cableRunName: run.name,
      end: t.end,
      status: t.status,
      uploadedBy: person(uploaders.find((u) => u.id === t.uploadedById), t.uploadedById),
      createdAt: t.createdAt.toISOString(),
      archivedAt: new Date(t.archivedAt!).toISOString(),
      archivedBy: last ? person(last.by, last.byId) : { id: 0, name: 'unknown' },
      reason: last?.reason ?? '',
    };
  });
  return { items, total: count, page, pageSize };
}
