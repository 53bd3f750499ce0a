import { literal, Op, QueryTypes, type WhereOptions } from 'sequelize';
import type { z } from 'zod';
import { describeRoutePosition, distanceFromA, metresText, routePosition } from '../../shared/field/route-position';
import { twoEndedLocation } from '../../shared/field/two-ended';
import { can } from '../../shared/auth/permissions';
import type { FindingInputSchema, FindingListQuerySchema, FindingView, TwoEndedView } from '../../shared/schemas/findings';
import type { Page } from '../../shared/schemas/users';
import type { AppContext } from '../context';
import { CableRun, Finding, FindingDecision, RouteMarker, Site, Ticket, TicketFinding, Trace, User } from '../db/models';
import { sameFaultFindingIdsOf } from './best-location';
import { AppError } from '../errors';
import type { WriteReceipt } from '../http/idempotency';
import { emitFindingConfirmed } from './events';
import { containsPattern, idsContaining } from '../db/text-search';
import { containsText } from '../db/search';
import { FINDINGS_FOLDED_WHERE, FINDINGS_TEXT_FTS } from '../db/migrations/0018-findings-text-index';
import { pendingConflict } from '../traces/traces.service';
import { mailFindingConfirmed } from '../tickets/tickets.mail';

export { findingEvents } from './events';

type FindingInput = z.output<typeof FindingInputSchema>;

async function views(findings: Finding[]): Promise<FindingView[]> {
  if (!findings.length) return [];
  const [sites, runs, traces, users] = await Promise.all([
    Site.findAll({ where: { id: [...new Set(findings.map((f) => f.siteId))] } }),
    CableRun.findAll({ where: { id: [...new Set(findings.map((f) => f.cableRunId))] } }),
    Trace.findAll({ where: { id: [...new Set(findings.map((f) => f.traceId))] } }),
    User.findAll({ where: { id: [...new Set(findings.map((f) => f.confirmedById))] } }),
  ]);
  return findings.map((f) => {
    const run = runs.find((r) => r.id === f.cableRunId)!;
    const trace = traces.find((t) => t.id === f.traceId)!;
    const user = users.find((u) => u.id === f.confirmedById);
    const event = trace.analysis?.events.find((e) => e.index === f.eventIndex);
    return {
      id: f.id,
      siteId: f.siteId,
      siteName: sites.find((s) => s.id === f.siteId)?.name ?? '',
      cableRunId: f.cableRunId,
      cableRunName: run.name,
      traceId: f.traceId,
      traceName: trace.originalName,
      end: trace.end,
      endLabel: trace.end === 'A' ? run.endALabel : run.endBLabel,
      eventIndex: f.eventIndex,
      eventType: event?.type ?? '',
      kind: f.kind,
      note: f.note,
      roundTripNs: f.roundTripNs,
      distanceM: f.distanceM,
      uncertaintyM: f.uncertaintyM,
      windowStartM: f.windowStartM,
      windowEndM: f.windowEndM,
      distanceFromAM: f.distanceFromAM,
      routePosition: f.routePosition,
      routePositionText: f.routePositionText,
      status: f.status,
      confirmedBy: { id: f.confirmedById, name: user?.name ?? `user ${f.confirmedById}` },
      confirmedAt: f.confirmedAt.toISOString(),
      vf: trace.vf,
      vfTolerance: trace.vfTolerance,
      engineVersion: trace.engineVersion,
    };
  });
}

/** Where on the ground an event of a trace is, with the run's markers as they are now. */
export async function placeEvent(trace: Trace, eventIndex: number) {
  const event = trace.analysis?.events.find((e) => e.index === eventIndex);
  if (!event) {
    throw new AppError(422, 'no_such_event', `Trace ${trace.id} has no event ${eventIndex}.`, {
      fields: [{ field: 'eventIndex', message: `trace ${trace.id} has no event ${eventIndex}` }],
    });
  }
  // An analysis stored before the engine refused absurd time axes may hold overflowed or missing numbers.
  const values = [event.roundTripNs, event.distanceM, event.uncertaintyM, event.windowStartM, event.windowEndM];
  if (!values.every((v) => typeof v === 'number' && Number.isFinite(v)) || !(event.uncertaintyM >= 0 && event.windowEndM >= event.windowStartM)) {
    throw new AppError(422, 'implausible_event', `Event ${eventIndex} of trace ${trace.id} has no usable distance or window (its analysis holds numbers out of range); re-upload the file with a correct time axis.`, {
      fields: [{ field: 'eventIndex', message: `event ${eventIndex} of trace ${trace.id} has no finite distance and window` }],
    });
  }
  const run = (await CableRun.findByPk(trace.cableRunId))!;
  const markers = await RouteMarker.findAll({ where: { cableRunId: run.id } });
  const pos = routePosition(
    { installedLengthM: run.installedLengthM, endALabel: run.endALabel, endBLabel: run.endBLabel, markers },
    trace.end,
    event.distanceM,
    { startM: event.windowStartM, endM: event.windowEndM },
  );
  return { event, run, pos, text: describeRoutePosition(pos, metresText) };
}

export async function recordFinding(ctx: AppContext, input: FindingInput, userId: number, receipt?: WriteReceipt): Promise<FindingView> {
  const id = await ctx.sequelize.transaction(async (transaction) => {
    // The trace row is held (FOR UPDATE on PostgreSQL; SQLite runs write transactions one at a time) while the
    // checks run, so an archive made at the same moment waits and then sees the finding, or this sees it archived.
    const trace = await Trace.findByPk(input.traceId, { transaction, lock: transaction.LOCK.UPDATE });
    if (!trace) {
      throw new AppError(422, 'no_such_trace', `There is no trace ${input.traceId}.`, {
        fields: [{ field: 'traceId', message: `there is no trace ${input.traceId}` }],
      });
    }
    if (trace.archivedAt) {
      throw new AppError(409, 'trace_archived', `Trace ${trace.id} is archived as junk: an administrator restores it before a finding is made from it.`, {
        fields: [{ field: 'traceId', message: 'the trace is archived' }],
      });
    }
    if (trace.status === 'pending') throw pendingConflict(trace.id, 'decided on');
    if (trace.status !== 'ok') {
      throw new AppError(422, 'trace_failed', `Trace ${trace.id} could not be read, so no finding can be made from it.`, {
        fields: [{ field: 'traceId', message: 'the trace was not readable' }],
      });
    }
    // The decision on an event belongs to whoever uploaded the trace, or to a supervisor.
    const actor = await User.findByPk(userId, { transaction });
    if (!actor) throw AppError.unauthenticated();
    if (trace.uploadedById !== userId && !can(actor.role, 'findings:review')) {
      const uploader = await User.findByPk(trace.uploadedById, { attributes: ['name'], transaction });
      throw new AppError(
        403,
        'not_your_trace',
        `Trace ${trace.id} was uploaded by ${uploader?.name ?? 'someone else'}: deciding its events is theirs or a supervisor's.`,
      );
    }
    const existing = await Finding.findOne({ where: { traceId: trace.id, eventIndex: input.eventIndex }, transaction });
    if (existing) {
      throw new AppError(
        409,
        'already_decided',
        `Event ${input.eventIndex} of this trace was already ${existing.status} (finding ${existing.id}); a supervisor can reverse that with a reason.`,
        { findingId: existing.id },
      );
    }
    const { event, run, pos, text } = await placeEvent(trace, input.eventIndex);
    const finding = await Finding.create(
      {
        siteId: run.siteId,
        cableRunId: run.id,
        traceId: trace.id,
        eventIndex: event.index,
        kind: input.kind,
        note: input.note,
        roundTripNs: event.roundTripNs,
        distanceM: event.distanceM,
        uncertaintyM: event.uncertaintyM,
        windowStartM: event.windowStartM,
        windowEndM: event.windowEndM,
        distanceFromAM: distanceFromA(run, trace.end, event.distanceM),
        routePosition: pos,
        routePositionText: text,
        status: input.status,
        confirmedById: userId,
        confirmedAt: new Date(),
      },
      { transaction },
    );
    await FindingDecision.create(
      { findingId: finding.id, action: 'decided', fromStatus: null, toStatus: input.status, kind: input.kind, reason: null, decidedById: userId },
      { transaction },
    );
    // The site supervisors' e-mail is stored with the finding, never after it: a server stopped in between would
    // leave a confirmed fault nobody was told about.
    if (input.status === 'confirmed') await mailFindingConfirmed(ctx, finding.id, transaction);
    await receipt?.(transaction, finding.id);
    return finding.id;
  });
  if (input.status === 'confirmed') emitFindingConfirmed(id, ctx.log);
  return getFinding(id);
}

/**
 * The repair tickets acting on a finding: any not withdrawn, oldest first —
 * also those raised for another reading of the same fault (from the other end,
 * or a later upload), so a fault already on a ticket is not ticketed twice.
 */
export async function ticketsFor(findingId: number): Promise<NonNullable<FindingView['tickets']>> {
  const f = await Finding.findByPk(findingId);
  if (!f) return [];
  return (await ticketsOf([f])).get(f.id)!;
}

/** `ticketsFor` for many findings at once, by finding id, in a fixed number of queries however many they are. */
async function ticketsOf(findings: Finding[]): Promise<Map<number, NonNullable<FindingView['tickets']>>> {
  const out = new Map<number, NonNullable<FindingView['tickets']>>(findings.map((f) => [f.id, []]));
  if (findings.length === 0) return out;
  const sameFault = await sameFaultFindingIdsOf(findings);
  const links = await TicketFinding.findAll({ where: { findingId: [...new Set([...sameFault.values()].flat())] }, attributes: ['ticketId', 'findingId'] });
  if (links.length === 0) return out;
  const tickets = await Ticket.findAll({
    where: { id: [...new Set(links.map((l) => l.ticketId))], status: { [Op.ne]: 'withdrawn' } },
    attributes: ['id', 'title', 'status'],
    order: [['id', 'ASC']],
  });
  for (const f of findings) {
    const ids = new Set(sameFault.get(f.id));
    const on = new Set(links.filter((l) => ids.has(l.findingId)).map((l) => l.ticketId));
    out.set(
      f.id,
      tickets.filter((t) => on.has(t.id)).map((t) => ({ id: t.id, title: t.title, status: t.status })),
    );
  }
  return out;
}

export async function getFinding(id: number): Promise<FindingView> {
  const f = await Finding.findByPk(id);
  if (!f) throw AppError.notFound(`Finding ${id}`);
  return (await views([f]))[0];
}

const TEXT_COLUMNS = ['note', 'kind', 'route_position_text'];
/** Up to this many findings holding the text are read by id rather than by walking a sort index. */
const FEW_MATCHES = 2000;

/**
 * Findings whose note, kind or route position sentence contains `text`, as
 * `idsContaining` finds them. On SQLite, ASCII text of three characters or
 * more is looked up in the trigram index (migration 0018); the index folds
 * case more widely than LIKE, so the few findings holding a letter it folds
 * into ASCII (listed in their own partial index) are kept only if LIKE
 * matches them too. On PostgreSQL the trigram indexes serve ILIKE directly.
 */
async function findingsContaining(text: string) {
  const sequelize = Finding.sequelize!;
  // Shorter text has no trigram; LIKE matches letters beyond ASCII in their own case only, so such text is
  // not looked up in the index (which would find every case of it) but matched by LIKE alone.
  const ascii = ![...text].some((ch) => ch.charCodeAt(0) > 0x7f);
  if (sequelize.getDialect() !== 'sqlite' || text.length < 3 || !ascii) return idsContaining(Finding, TEXT_COLUMNS, text);
  const qi = sequelize.getQueryInterface();
  const id = `${qi.quoteIdentifier(Finding.name)}.${qi.quoteIdentifier('id')}`;
  const pattern = sequelize.escape(containsPattern(text));
  const phrase = sequelize.escape(`"${text.replace(/"/g, '""')}"`);
  const like = TEXT_COLUMNS.map((c) => `${qi.quoteIdentifier(c)} LIKE ${pattern} ESCAPE '\\'`).join(' OR ');
  const found = `SELECT rowid FROM ${FINDINGS_TEXT_FTS} WHERE ${FINDINGS_TEXT_FTS} MATCH ${phrase}`;
  // A few matches are read by id and sorted; many are met walking the list's sort index (the unary plus
  // keeps the id test from driving the query), which stops at the end of the page.
  const [{ n }] = await sequelize.query<{ n: number }>(`SELECT count(*) AS n FROM (${found} LIMIT ${FEW_MATCHES + 1})`, {
    type: QueryTypes.SELECT,
  });
  return literal(
    `${n > FEW_MATCHES ? '+' : ''}${id} IN (${found}) ` +
      `AND +${id} NOT IN (SELECT id FROM findings WHERE (${FINDINGS_FOLDED_WHERE}) AND NOT coalesce(${like}, 0))`,
  );
}

/**
 * Findings holding the text, or on a site or cable run whose name holds it
 * (matched as the site and run lists match names). Sites and runs are few:
 * their ids are read first, and a text naming none leaves the query as it was.
 */
async function findingsMatching(text: string): Promise<WhereOptions<Finding>> {
  const [own, sites, runs] = await Promise.all([
    findingsContaining(text),
    Site.findAll({ attributes: ['id'], where: containsText(Site, 'name', text) }),
    CableRun.findAll({ attributes: ['id'], where: containsText(CableRun, 'name', text) }),
  ]);
  const places: WhereOptions<Finding>[] = [];
  if (sites.length) places.push({ siteId: { [Op.in]: sites.map((x) => x.id) } });
  if (runs.length) places.push({ cableRunId: { [Op.in]: runs.map((x) => x.id) } });
  return places.length ? { [Op.or]: [own, ...places] } : own;
}

export async function listFindings(q: z.output<typeof FindingListQuerySchema>): Promise<Page<FindingView>> {
  const where: WhereOptions<Finding> = {
    ...(q.siteId ? { siteId: q.siteId } : {}),
    ...(q.cableRunId ? { cableRunId: q.cableRunId } : {}),
    ...(q.traceId ? { traceId: q.traceId } : {}),
    ...(q.status ? { status: q.status } : {}),
    // Text search: the note, the kind and the route position sentence, and the site's and the run's names.
    ...(q.q ? { [Op.and]: [await findingsMatching(q.q)] } : {}),
  };
  const { rows, count } = await Finding.findAndCountAll({
    where,
    order: [
      [q.sort, q.dir.toUpperCase()],
      ['id', q.dir.toUpperCase()],
    ],
    limit: q.pageSize,
    offset: (q.page - 1) * q.pageSize,
  });
  const [items, tickets] = await Promise.all([views(rows), ticketsOf(rows)]);
  // Each row says which repair ticket acts on it, as the finding's own page does (read for all rows at once).
  for (const item of items) item.tickets = tickets.get(item.id)!;
  return { items, total: count, page: q.page, pageSize: q.pageSize };
}


/** Two-ended location from one event seen from end A and one from end B of the same run. */
export async function twoEnded(q: { traceA: number; eventA: number; traceB: number; eventB: number }): Promise<TwoEndedView> {
  const [a, b] = await Promise.all([Trace.findByPk(q.traceA), Trace.findByPk(q.traceB)]);
  if (!a || !b) throw AppError.notFound(`Trace ${!a ? q.traceA : q.traceB}`);
  if (a.cableRunId !== b.cableRunId || a.end !== 'A' || b.end !== 'B') {
    throw new AppError(422, 'not_two_ended', 'Two-ended location needs one trace from end A and one from end B of the same cable run.', {
      fields: [{ field: a.end !== 'A' ? 'traceA' : 'traceB', message: 'must be a trace of the same run from the other end' }],
    });
  }
  const pending = [a, b].find((t) => t.status === 'pending');
  if (pending) {
    const conflict = pendingConflict(pending.id, 'located from both ends');
    conflict.details = { fields: [{ field: pending === a ? 'traceA' : 'traceB', message: 'the trace is still being analysed' }] };
    throw conflict;
  }
  const ea = a.analysis?.events.find((e) => e.index === q.eventA);
  const eb = b.analysis?.events.find((e) => e.index === q.eventB);
  if (!ea || !eb) {
    throw new AppError(422, 'no_such_event', 'One of the events was not found on its trace.', {
      fields: [{ field: !ea ? 'eventA' : 'eventB', message: 'no such event on that trace' }],
    });
  }
  const run = (await CableRun.findByPk(a.cableRunId))!;
  const result = twoEndedLocation({
    installedLengthM: run.installedLengthM,
    roundTripANs: ea.roundTripNs,
    roundTripBNs: eb.roundTripNs,
    singleEndedAM: ea.distanceM,
    singleEndedBM: eb.distanceM,
  });
  const markers = await RouteMarker.findAll({ where: { cableRunId: run.id } });
  const half = Math.abs(result.disagreementAM ?? 0) / 2 + 0.5;
  const pos = routePosition(
    { installedLengthM: run.installedLengthM, endALabel: run.endALabel, endBLabel: run.endBLabel, markers },
    'A',
    result.distanceFromAM,
    { startM: result.distanceFromAM - half, endM: result.distanceFromAM + half },
  );
  return {
    ...result,
    installedLengthM: run.installedLengthM,
    traceA: { id: a.id, eventIndex: ea.index, roundTripNs: ea.roundTripNs, distanceM: ea.distanceM },
    traceB: { id: b.id, eventIndex: eb.index, roundTripNs: eb.roundTripNs, distanceM: eb.distanceM },
    routePosition: pos,
    routePositionText: describeRoutePosition(pos, metresText),
  };
}

/** Confirmed findings on the same run from the other end, near enough to be the same fault. */
export async function twoEndedFor(id: number): Promise<TwoEndedView | null> {
  const f = await Finding.findByPk(id);
  if (!f) throw AppError.notFound(`Finding ${id}`);
  if (f.status !== 'confirmed') return null;
  const trace = (await Trace.findByPk(f.traceId))!;
  const others = await Finding.findAll({ where: { cableRunId: f.cableRunId, status: 'confirmed', id: { [Op.ne]: f.id } } });
  const otherTraces = await Trace.findAll({ where: { id: others.map((o) => o.traceId), end: trace.end === 'A' ? 'B' : 'A' } });
  const run = (await CableRun.findByPk(f.cableRunId))!;
  const tolerance = Math.max(5, 0.05 * run.installedLengthM);
  const candidates = others
    .filter((o) => otherTraces.some((t) => t.id === o.traceId))
    .filter((o) => Math.abs(o.distanceFromAM - f.distanceFromAM) <= tolerance + o.uncertaintyM + f.uncertaintyM)
    .sort((x, y) => Math.abs(x.distanceFromAM - f.distanceFromAM) - Math.abs(y.distanceFromAM - f.distanceFromAM));
  const pair = candidates[0];
  if (!pair) return null;
  const [fa, fb] = trace.end === 'A' ? [f, pair] : [pair, f];
  return twoEnded({ traceA: fa.traceId, eventA: fa.eventIndex, traceB: fb.traceId, eventB: fb.eventIndex });
}
