import { literal, Op, type Transaction } from 'sequelize';
import type { z } from 'zod';
import { CALIBRATION_VF_MAX, CALIBRATION_VF_MIN } from '../../shared/cable/calibration';
import { can } from '../../shared/auth/permissions';
import { FINDING_KIND_LABELS } from '../../shared/schemas/findings';
import type {
  CloseoutSchema,
  TicketCreateSchema,
  TicketDetail,
  TicketListQuerySchema,
  TicketMoveSchema,
  TicketSummary,
  TicketUpdateSchema,
} from '../../shared/schemas/tickets';
import type { Page } from '../../shared/schemas/users';
import { closeoutCalibrationNote, CloseoutInputError, compareLocatedFound } from '../../shared/tickets/closeout';
import { CLOSEOUT_FROM, findMove, OPEN_STATUSES, TICKET_PRIORITY_LABELS, TICKET_STATUS_LABELS, type TicketStatus } from '../../shared/tickets/status';
import type { SessionUser } from '../auth/guards';
import { submitCalibration } from '../calibrations/calibrations.service';
import type { AppContext } from '../context';
import { CableRun, Finding, MailJob, RouteMarker, Site, Ticket, TicketCloseout, TicketEvent, TicketFinding, Trace, User } from '../db/models';
import { AppError } from '../errors';
import type { WriteReceipt } from '../http/idempotency';
import { formatDate } from '../../shared/units/format-date';
import { bestLocationFor, repairedBetween, repairTimes, sameFault } from '../findings/best-location';
import { scoreMethodsAtCloseout, scoresOfCloseout } from '../findings/method-scores';
import { mailTicket } from './tickets.mail';
import { closeoutView, eventView, findingView, mailDetailsFor, mailInTrouble, permissionsFor, summaryView } from './tickets.views';

type CreateInput = z.output<typeof TicketCreateSchema>;
type UpdateInput = z.output<typeof TicketUpdateSchema>;
type MoveInput = z.output<typeof TicketMoveSchema>;
type CloseoutInput = z.output<typeof CloseoutSchema>;

const fieldError = (status: number, code: string, field: string, message: string, extra?: Record<string, unknown>) =>
  new AppError(status, code, `${field}: ${message}`, { fields: [{ field, message }], ...extra });

const isSupervisor = (u: SessionUser) => can(u.role, 'tickets:manage');

async function loadTicket(id: number, transaction?: Transaction) {
  const t = await Ticket.findByPk(id, { transaction, lock: transaction ? true : undefined });
  if (!t) throw AppError.notFound(`Ticket ${id}`);
  return t;
}

async function checkAssignee(assigneeId: number, transaction: Transaction) {
  // The person's row is held (FOR SHARE on PostgreSQL; SQLite writes one at a time) until the ticket is stored: a
  // deactivation or change of role made at the same moment waits, then counts this repair among theirs, or comes
  // first and this sees it. Without the hold a repair could go to someone who can no longer sign in, unseen.
  const u = await User.findByPk(assigneeId, { transaction, lock: transaction.LOCK.SHARE });
  if (!u || !u.active || u.role !== 'technician') {
    throw fieldError(422, 'not_a_technician', 'assigneeId', `user ${assigneeId} is not an active field technician`);
  }
  return u;
}

async function record(
  ticketId: number,
  actorId: number,
  e: { kind: TicketEvent['kind']; fromStatus?: TicketStatus | null; toStatus?: TicketStatus | null; comment?: string | null; changes?: Record<string, [unknown, unknown]> | null },
  transaction: Transaction,
) {
  await TicketEvent.create(
    {
      ticketId,
      actorId,
      kind: e.kind,
      fromStatus: e.fromStatus ?? null,
      toStatus: e.toStatus ?? null,
      comment: e.comment ?? null,
      changes: e.changes ? JSON.stringify(e.changes) : null,
    },
    { transaction },
  );
}

/** Findings a ticket is still acting on (any ticket not withdrawn). */
async function findingsOnActiveTickets(findingIds: number[], transaction?: Transaction) {
  if (findingIds.length === 0) return [];
  const links = await TicketFinding.findAll({ where: { findingId: findingIds }, transaction });
  if (links.length === 0) return [];
  const active = await Ticket.findAll({ where: { id: [...new Set(links.map((l) => l.ticketId))], status: { [Op.ne]: 'withdrawn' } }, attributes: ['id'], transaction });
  const activeIds = new Set(active.map((t) => t.id));
  return links.filter((l) => activeIds.has(l.ticketId));
}

export async function createTicket(ctx: AppContext, actor: SessionUser, input: CreateInput): Promise<TicketDetail> {
  const ticketId = await ctx.sequelize.transaction(async (transaction) => {
    const ids = [...new Set(input.findingIds)];
    // The findings' rows are held (in id order) until the ticket is stored: PostgreSQL runs transactions side by
    // side, and without the hold two supervisors could each put the same finding on a ticket of their own, or a
    // reviewer dismiss it while it goes on one (reverseDecision holds the same row). SQLite writes one at a time.
    await Finding.findAll({ where: { id: ids }, attributes: ['id'], order: [['id', 'ASC']], lock: transaction.LOCK.UPDATE, transaction });
    const findings = await Finding.findAll({ where: { id: ids }, include: [{ association: 'cableRun' }, { association: 'site' }], transaction });
    const missing = ids.filter((id) => !findings.some((f) => f.id === id));
    if (missing.length) throw fieldError(422, 'unknown_finding', 'findingIds', `finding ${missing.join(', ')} does not exist`);
    const dismissed = findings.filter((f) => f.status !== 'confirmed');
    if (dismissed.length) throw fieldError(422, 'finding_not_confirmed', 'findingIds', `finding ${dismissed.map((f) => f.id).join(', ')} was dismissed, not confirmed as a fault`);
    const runs = new Set(findings.map((f) => f.cableRunId));
    if (runs.size > 1) throw fieldError(422, 'findings_on_several_runs', 'findingIds', 'all findings of one ticket must be on the same cable run');
    const taken = await findingsOnActiveTickets(ids, transaction);
    if (taken.length) {
      throw fieldError(409, 'finding_already_ticketed', 'findingIds', `finding ${taken.map((l) => `${l.findingId} is on ticket ${l.ticketId}`).join(', ')}`);
    }
    if (input.assigneeId) await checkAssignee(input.assigneeId, transaction);
    const f0 = findings[0];
    const title = input.title ?? `${FINDING_KIND_LABELS[f0.kind as keyof typeof FINDING_KIND_LABELS] ?? f0.kind} on ${f0.cableRun!.name}`;
    const status: TicketStatus = input.assigneeId ? 'assigned' : 'raised';
    const t = await Ticket.create(
      {
        title,
        siteId: f0.siteId,
        cableRunId: f0.cableRunId,
        status,
        priority: input.priority,
        assigneeId: input.assigneeId,
        dueDate: input.dueDate,
        notes: input.notes,
        createdById: actor.id,
        closedAt: null,
      },
      { transaction },
    );
    for (const f of findings) await TicketFinding.create({ ticketId: t.id, findingId: f.id }, { transaction });
    await record(t.id, actor.id, { kind: 'created', toStatus: 'raised', changes: { findings: [null, ids] } }, transaction);
    if (input.assigneeId) {
      const who = await User.findByPk(input.assigneeId, { transaction });
      await record(t.id, actor.id, { kind: 'assigned', fromStatus: 'raised', toStatus: 'assigned', changes: { assignee: [null, who!.name] } }, transaction);
      await mailTicket(ctx, t.id, actor, { kind: 'assigned' }, transaction);
    }
    return t.id;
  });
  return getTicket(ticketId, actor);
}

const describeChange = (field: string, before: unknown, after: unknown) => {
  const show = (v: unknown) =>
    v === null || v === undefined || v === '' ? 'none' : field === 'priority' ? TICKET_PRIORITY_LABELS[v as 'normal'] : field === 'dueDate' ? formatDate(String(v)) : String(v);
  const name = { title: 'title', priority: 'priority', dueDate: 'due date', notes: 'notes', assignee: 'assignee' }[field] ?? field;
  return field === 'notes' ? 'notes updated' : `${name} ${show(before)} → ${show(after)}`;
};

/**
 * Two supervisors editing one ticket at once (both give it to someone, both move its date): a field this change sets
 * that the other changed after this editor opened the ticket is refused (409 `changed_meanwhile`), rather than
 * overwriting theirs unseen. A field both set to the same value is no conflict; fields sent without `basedOn` are
 * taken as before.
 */
async function refuseStaleEdit(t: Ticket, input: UpdateInput, transaction: Transaction) {
  const basedOn = input.basedOn;
  if (!basedOn) return;
  const blank = (v: unknown) => (v === undefined || v === '' ? null : v);
  const stale: Array<{ field: string; now: unknown; from: unknown }> = [];
  for (const field of ['title', 'assigneeId', 'priority', 'dueDate', 'notes'] as const) {
    if (input[field] === undefined || !(field in basedOn)) continue;
    const now = blank(t[field]);
    const from = blank(basedOn[field]);
    if (now !== from && now !== blank(input[field])) stale.push({ field, now, from });
  }
  if (!stale.length) return;
  const ids = stale.filter((s) => s.field === 'assigneeId').flatMap((s) => [s.now, s.from]).filter((v): v is number => typeof v === 'number');
  const people = new Map((await User.findAll({ where: { id: ids }, attributes: ['id', 'name'], transaction })).map((u) => [u.id, u.name]));
  const shown = (field: string, v: unknown) =>
    v === null ? (field === 'assigneeId' ? 'nobody' : 'empty') : field === 'assigneeId' ? (people.get(v as number) ?? `user ${String(v)}`) : String(v);
  const last = await TicketEvent.findOne({ where: { ticketId: t.id }, order: [['id', 'DESC']], include: [{ association: 'actor', attributes: ['name'] }], transaction });
  const who = (last as unknown as { actor?: { name: string } | null } | null)?.actor?.name;
  const byWhom = last ? ` (last saved${who ? ` by ${who}` : ''} at ${last.createdAt.toISOString()})` : '';
  throw new AppError(
    409,
    'changed_meanwhile',
    `Someone else changed ${stale.map((s) => s.field).join(', ')} of ticket ${t.id} after you opened it${byWhom}. Nothing was saved: open the ticket again to see the current values, then make your change if it still stands.`,
    { fields: stale.map((s) => ({ field: s.field, message: `is now ${shown(s.field, s.now)}; you started from ${shown(s.field, s.from)}` })) },
  );
}

export async function updateTicket(ctx: AppContext, actor: SessionUser, id: number, input: UpdateInput, receipt?: WriteReceipt): Promise<TicketDetail> {
  await ctx.sequelize.transaction(async (transaction) => {
    const t = await loadTicket(id, transaction);
    if (!['raised', 'assigned', 'under-way'].includes(t.status)) {
      throw new AppError(409, 'ticket_not_editable', `Ticket ${id} is ${TICKET_STATUS_LABELS[t.status].toLowerCase()}; it can no longer be edited.`);
    }
    await refuseStaleEdit(t, input, transaction);
    const changes: Record<string, [unknown, unknown]> = {};
    for (const field of ['title', 'priority', 'dueDate', 'notes'] as const) {
      if (input[field] !== undefined && input[field] !== t[field]) changes[field] = [t[field], input[field]];
    }
    // A new due date cannot be in the past (a day's grace for time zones, as when a ticket is raised);
    // an overdue ticket keeps its date while other fields change.
    const due = changes.dueDate?.[1];
    if (typeof due === 'string' && Date.parse(`${due}T00:00:00Z`) < Date.now() - 2 * 86_400_000) {
      throw AppError.badRequest('invalid_input', `The due date ${due} is in the past: choose today or a later day.`, {
        fields: [{ field: 'dueDate', message: 'is in the past' }],
      });
    }
    const oldAssigneeId = t.assigneeId;
    const oldStatus = t.status;
    const assigneeChanged = input.assigneeId !== undefined && input.assigneeId !== oldAssigneeId;
    let newStatus = t.status;
    let oldAssignee: User | null = null;
    let newAssignee: User | null = null;
    if (assigneeChanged) {
      if (input.assigneeId) newAssignee = await checkAssignee(input.assigneeId, transaction);
      if (oldAssigneeId) oldAssignee = await User.findByPk(oldAssigneeId, { transaction });
      // A new person starts from "assigned"; nobody at all sends the ticket back to "raised".
      newStatus = input.assigneeId ? 'assigned' : 'raised';
    }
    if (!assigneeChanged && Object.keys(changes).length === 0) {
      // Every value is as it was: a comment sent with them is still the editor's word on the ticket, so it is
      // kept as a comment rather than lost with the unchanged fields.
      const comment = input.comment?.trim();
      if (!comment) throw AppError.badRequest('nothing_changed', 'Nothing to change: every value given is the same as now.');
      await record(t.id, actor.id, { kind: 'comment', comment }, transaction);
      t.changed('updatedAt', true);
      await t.save({ transaction });
      await mailTicket(ctx, t.id, actor, { kind: 'comment', comment }, transaction);
      await receipt?.(transaction, t.id);
      return;
    }
    await t.update(
      {
        ...Object.fromEntries(Object.entries(changes).map(([k, [, after]]) => [k, after])),
        ...(assigneeChanged ? { assigneeId: input.assigneeId ?? null, status: newStatus } : {}),
      },
      { transaction },
    );
    if (assigneeChanged) {
      await record(
        t.id,
        actor.id,
        { kind: 'assigned', fromStatus: oldStatus, toStatus: newStatus, comment: input.comment, changes: { assignee: [oldAssignee?.name ?? null, newAssignee?.name ?? null] } },
        transaction,
      );
    }
    if (Object.keys(changes).length) {
      await record(t.id, actor.id, { kind: 'updated', comment: assigneeChanged ? null : input.comment, changes }, transaction);
    }
    if (assigneeChanged) {
      if (oldAssignee) await mailTicket(ctx, t.id, actor, { kind: 'unassigned', to: oldAssignee }, transaction);
      if (newAssignee) await mailTicket(ctx, t.id, actor, { kind: 'assigned' }, transaction);
    } else {
      const words = Object.entries(changes).map(([k, [a, b]]) => describeChange(k, a, b));
      await mailTicket(ctx, t.id, actor, { kind: 'updated', changes: words, comment: input.comment ?? null }, transaction);
    }
    await receipt?.(transaction, t.id);
  });
  return getTicket(id, actor);
}

function checkMover(t: Ticket, actor: SessionUser) {
  const isAssignee = t.assigneeId === actor.id;
  if (!isAssignee && !isSupervisor(actor)) {
    throw AppError.forbidden(`Only the ticket's assignee or a supervisor may change ticket ${t.id}.`);
  }
  return { isAssignee, isSupervisor: isSupervisor(actor) };
}

/**
 * Starting, pausing and recording the close-out are the assigned technician's own steps, not a supervisor's: a
 * supervisor who wants other hands on the work assigns the ticket to them. Anyone else is told whose the step is.
 */
async function assigneeOnly(t: Ticket, step: string, transaction: Transaction) {
  const assignee = t.assigneeId === null ? null : await User.findByPk(t.assigneeId, { attributes: ['id', 'name'], transaction });
  const whose = assignee ? `Ticket ${t.id} is assigned to ${assignee.name}: only they may ${step}` : `Ticket ${t.id} is assigned to nobody: only its assignee may ${step}`;
  return new AppError(403, 'assignee_only', `${whose}. To have someone else do it, a supervisor assigns the ticket to them.`);
}

export async function moveTicket(ctx: AppContext, actor: SessionUser, id: number, input: MoveInput): Promise<TicketDetail> {
  await ctx.sequelize.transaction(async (transaction) => {
    const t = await loadTicket(id, transaction);
    const who = checkMover(t, actor);
    const from = t.status;
    const to = input.to;
    if (from === to) {
      // A second click, or two people making the same step at once: say so, rather than why the step is not allowed.
      const now = TICKET_STATUS_LABELS[to].toLowerCase();
      throw new AppError(409, 'status_step_not_allowed', `Ticket ${id} is already ${now}; nothing was changed.`, {
        fields: [{ field: 'to', message: `the ticket is already ${now}` }],
      });
    }
    const move = findMove(from, to);
    if (!move) {
      const why =
        to === 'signed-off'
          ? 'a ticket is signed off only once it is fixed, and it becomes fixed only through a close-out (where the fault was found, what it was, what was done)'
          : to === 'fixed'
            ? 'a ticket becomes fixed only by recording a close-out (POST /api/tickets/:id/closeout)'
            : to === 'assigned' && from === 'raised'
              ? 'assign it by choosing an assignee'
              : `there is no step from ${TICKET_STATUS_LABELS[from].toLowerCase()} to ${TICKET_STATUS_LABELS[to].toLowerCase()}`;
      throw new AppError(409, 'status_step_not_allowed', `Ticket ${id} cannot go from "${TICKET_STATUS_LABELS[from]}" to "${TICKET_STATUS_LABELS[to]}": ${why}.`, {
        fields: [{ field: 'to', message: why }],
      });
    }
    const allowed = (who.isAssignee && move.by.includes('assignee')) || (who.isSupervisor && move.by.includes('supervisor'));
    if (!allowed && !move.by.includes('supervisor')) throw await assigneeOnly(t, `${move.label.toLowerCase()} on it`, transaction);
    if (!allowed) throw AppError.forbidden(`Only a supervisor may ${move.label.toLowerCase()} ticket ${id}.`);
    const closed = to === 'signed-off' || to === 'withdrawn';
    await t.update({ status: to, closedAt: closed ? new Date() : null }, { transaction });
    await record(t.id, actor.id, { kind: 'status', fromStatus: from, toStatus: to, comment: input.comment }, transaction);
    await mailTicket(ctx, t.id, actor, { kind: 'status', from, to, comment: input.comment }, transaction);
  });
  return getTicket(id, actor);
}

export async function commentOnTicket(ctx: AppContext, actor: SessionUser, id: number, comment: string, receipt?: WriteReceipt): Promise<TicketDetail> {
  await ctx.sequelize.transaction(async (transaction) => {
    const t = await loadTicket(id, transaction);
    checkMover(t, actor);
    if (t.status === 'withdrawn') throw new AppError(409, 'ticket_withdrawn', `Ticket ${id} was withdrawn; it takes no more comments.`);
    await record(t.id, actor.id, { kind: 'comment', comment }, transaction);
    await t.changed('updatedAt', true);
    await t.save({ transaction });
    await mailTicket(ctx, t.id, actor, { kind: 'comment', comment }, transaction);
    await receipt?.(transaction, t.id);
  });
  return getTicket(id, actor);
}

export async function closeOutTicket(ctx: AppContext, actor: SessionUser, id: number, input: CloseoutInput, receipt?: WriteReceipt): Promise<TicketDetail> {
  await ctx.sequelize.transaction(async (transaction) => {
    const t = await loadTicket(id, transaction);
    checkMover(t, actor);
    if (!CLOSEOUT_FROM.includes(t.status)) {
      throw new AppError(409, 'closeout_not_allowed', `Ticket ${id} is ${TICKET_STATUS_LABELS[t.status].toLowerCase()}: a close-out is recorded while it is assigned or under way.`);
    }
    if (t.assigneeId !== actor.id) throw await assigneeOnly(t, 'record its close-out (where the fault was found and what was done)', transaction);
    const links = await TicketFinding.findAll({ where: { ticketId: t.id }, transaction });
    let findingId = input.findingId;
    if (findingId === undefined) {
      if (links.length !== 1) throw fieldError(400, 'invalid_input', 'findingId', 'is required: this ticket has several findings; say which one the found position answers');
      findingId = links[0].findingId;
    } else if (!links.some((l) => l.findingId === findingId)) {
      throw fieldError(422, 'finding_not_on_ticket', 'findingId', `finding ${findingId} is not on ticket ${id}`);
    }
    const finding = await Finding.findByPk(findingId, { transaction });
    const trace = await Trace.findByPk(finding!.traceId, { transaction });
    const run = await CableRun.findByPk(t.cableRunId, { transaction });
    const markers = await RouteMarker.findAll({ where: { cableRunId: t.cableRunId }, transaction });
    const measuredFrom = (trace?.end ?? 'A') as 'A' | 'B';
    let result;
    try {
      result = compareLocatedFound(
        { installedLengthM: run!.installedLengthM, markers: markers.map((m) => ({ id: m.id, label: m.label, kind: m.kind, chainageM: m.chainageM, slackM: m.slackM })) },
        { measuredFrom, distanceM: finding!.distanceM, roundTripNs: finding!.roundTripNs },
        input.found,
      );
    } catch (err) {
      if (err instanceof CloseoutInputError) throw fieldError(422, 'found_position_off_cable', err.field, err.message);
      throw err;
    }
    const marker = input.found.method === 'marker' ? markers.find((m) => m.id === (input.found as { markerId: number }).markerId)! : null;
    let calibrationId: number | null = null;
    if (input.fileCalibration) {
      const vf = result.impliedVf;
      if (vf === null || vf > CALIBRATION_VF_MAX || vf < CALIBRATION_VF_MIN) {
        const why =
          vf === null
            ? 'a fault found at the measured end itself gives no velocity factor'
            : `the found position implies VF ${vf.toFixed(3)}, which no cable has (${CALIBRATION_VF_MIN}–${CALIBRATION_VF_MAX})`;
        throw fieldError(422, 'implied_vf_implausible', 'found', `${why}; check the position, or do not file a calibration if the fault found is not the one located`, {
          impliedVf: vf,
        });
      }
      const cal = await submitCalibration(
        {
          cableTypeId: run!.cableTypeId,
          knownLengthM: result.foundDistanceM,
          roundTripNs: finding!.roundTripNs,
          submittedById: actor.id,
          source: 'repair-closeout',
          traceId: finding!.traceId,
          note: closeoutCalibrationNote(t.id, finding!.id, result.locatedDistanceM, result.foundDistanceM, measuredFrom),
        },
        transaction,
      );
      calibrationId = cal.id;
    }
    const closeout = await TicketCloseout.create(
      {
        ticketId: t.id,
        findingId: finding!.id,
        method: input.found.method,
        markerId: marker?.id ?? null,
        markerLabel: marker?.label ?? null,
        offsetM: input.found.method === 'marker' ? input.found.offsetM : null,
        fromEnd: input.found.method === 'distance' ? input.found.fromEnd : null,
        enteredDistanceM: input.found.method === 'distance' ? input.found.distanceM : null,
        measuredFrom,
        foundDistanceM: result.foundDistanceM,
        foundFromAM: result.foundFromAM,
        foundChainageM: result.foundChainageM,
        locatedDistanceM: result.locatedDistanceM,
        errorM: result.errorM,
        roundTripNs: finding!.roundTripNs,
        traceVf: trace?.vf ?? 0,
        impliedVf: result.impliedVf,
        cableTypeId: run!.cableTypeId,
        cause: input.cause,
        workDone: input.workDone,
        calibrationId,
        recordedById: actor.id,
      },
      { transaction },
    );
    // Every method's estimate of this fault, and the best location, against where it was found.
    await scoreMethodsAtCloseout(closeout, run!.installedLengthM, transaction);
    const from = t.status;
    await t.update({ status: 'fixed' }, { transaction });
    await record(
      t.id,
      actor.id,
      {
        kind: 'closeout',
        fromStatus: from,
        toStatus: 'fixed',
        comment: input.comment,
        changes: { found: [result.locatedDistanceM, result.foundDistanceM], cause: [finding!.kind, input.cause] },
      },
      transaction,
    );
    await mailTicket(ctx, t.id, actor, { kind: 'status', from, to: 'fixed', comment: input.comment }, transaction);
    const creator = await User.findByPk(t.createdById, { transaction });
    if (creator) {
      const found = { measuredFrom, foundDistanceM: result.foundDistanceM, locatedDistanceM: result.locatedDistanceM, errorM: result.errorM };
      await mailTicket(ctx, t.id, actor, { kind: 'fixed', to: creator, found }, transaction);
    }
    await receipt?.(transaction, t.id);
  });
  return getTicket(id, actor);
}

export async function getTicket(id: number, viewer: SessionUser): Promise<TicketDetail> {
  const t = await Ticket.findByPk(id, {
    include: [
      { association: 'site' },
      { association: 'cableRun', include: [{ association: 'cableType' }, { association: 'markers' }] },
      { association: 'assignee' },
      { association: 'createdBy' },
      { association: 'findings', include: [{ association: 'trace' }, { association: 'confirmedBy' }] },
    ],
  });
  if (!t) throw AppError.notFound(`Ticket ${id}`);
  const [events, closeouts, mail] = await Promise.all([
    TicketEvent.findAll({ where: { ticketId: id }, include: [{ association: 'actor' }], order: [['createdAt', 'ASC'], ['id', 'ASC']] }),
    TicketCloseout.findAll({ where: { ticketId: id }, include: [{ association: 'recordedBy' }], order: [['id', 'DESC']] }),
    MailJob.findAll({ where: { ticketId: id }, order: [['id', 'DESC']] }),
  ]);
  const run = t.cableRun as CableRun;
  const site = t.site as Site;
  const findings = [...(t.findings ?? [])].sort((a, b) => a.id - b.id);
  return {
    ...summaryView(t, viewer, { findingCount: findings.length, mailTrouble: mail.some(mailInTrouble) }),
    notes: t.notes,
    createdBy: { id: t.createdById, name: t.createdBy?.name ?? `#${t.createdById}` },
    siteAddress: site.address,
    accessNotes: site.accessNotes,
    cableRun: {
      id: run.id,
      name: run.name,
      endALabel: run.endALabel,
      endBLabel: run.endBLabel,
      installedLengthM: run.installedLengthM,
      cableType: { id: run.cableTypeId, name: run.cableType?.name ?? `#${run.cableTypeId}` },
      markers: [...(run.markers ?? [])]
        .sort((a, b) => a.chainageM - b.chainageM)
        .map((m) => ({ id: m.id, label: m.label, kind: m.kind, chainageM: m.chainageM, slackM: m.slackM, notes: m.notes, latitude: m.latitude ?? null, longitude: m.longitude ?? null })),
    },
    // Each finding with the best location of its fault: the ticket, the crew sheet and the e-mails read the same numbers.
    findings: await Promise.all(findings.map(async (f) => ({ ...findingView(f), bestLocation: await bestLocationFor(f.id) }))),
    timeline: events.map(eventView),
    closeouts: await Promise.all(closeouts.map(async (c) => ({ ...closeoutView(c), methodScores: await scoresOfCloseout(c.id) }))),
    mail: mailDetailsFor(viewer, mail),
    can: permissionsFor(t, viewer),
  };
}

const PRIORITY_RANK = "CASE \"Ticket\".\"priority\" WHEN 'urgent' THEN 0 WHEN 'high' THEN 1 WHEN 'normal' THEN 2 ELSE 3 END";

/** Tickets for a list; the viewer's own come first, then by priority and due date. */
export async function listTickets(viewer: SessionUser, q: z.output<typeof TicketListQuerySchema>): Promise<Page<TicketSummary>> {
  const where: Record<string, unknown> = {};
  if (q.status === 'open') where.status = [...OPEN_STATUSES];
  else if (q.status !== 'all') where.status = q.status;
  if (q.assignee === 'me') where.assigneeId = viewer.id;
  if (q.siteId) where.siteId = q.siteId;
  const { rows, count } = await Ticket.findAndCountAll({
    where,
    include: [
      { association: 'site', attributes: ['id', 'name'] },
      { association: 'cableRun', attributes: ['id', 'name'] },
      { association: 'assignee', attributes: ['id', 'name'] },
    ],
    order: [
      [literal(`CASE WHEN "Ticket"."assignee_id" = ${Number(viewer.id)} THEN 0 ELSE 1 END`), 'ASC'],
      [literal(PRIORITY_RANK), 'ASC'],
      [literal('CASE WHEN "Ticket"."due_date" IS NULL THEN 1 ELSE 0 END'), 'ASC'],
      ['dueDate', 'ASC'],
      ['id', 'DESC'],
    ],
    limit: q.pageSize,
    offset: (q.page - 1) * q.pageSize,
    distinct: true,
  });
  const ids = rows.map((t) => t.id);
  const [links, jobs] = await Promise.all([
    ids.length ? TicketFinding.findAll({ where: { ticketId: ids } }) : [],
    ids.length ? MailJob.findAll({ where: { ticketId: ids, [Op.or]: [{ status: 'failed' }, { status: 'queued', attempts: { [Op.gt]: 0 } }] }, attributes: ['id', 'ticketId', 'status', 'attempts'] }) : [],
  ]);
  return {
    items: rows.map((t) =>
      summaryView(t, viewer, { findingCount: links.filter((l) => l.ticketId === t.id).length, mailTrouble: jobs.some((j) => j.ticketId === t.id && mailInTrouble(j)) }),
    ),
    total: count,
    page: q.page,
    pageSize: q.pageSize,
  };
}

/** Confirmed findings that no live ticket covers yet, newest first. */
export async function unticketedFindings(limit = 50) {
  const findings = await Finding.findAll({
    where: { status: 'confirmed' },
    include: [{ association: 'site', attributes: ['id', 'name'] }, { association: 'cableRun', attributes: ['id', 'name'] }, { association: 'trace' }, { association: 'confirmedBy' }],
    order: [['confirmedAt', 'DESC']],
  });
  const taken = new Set((await findingsOnActiveTickets(findings.map((f) => f.id))).map((l) => l.findingId));
  // A reading of a fault already on a ticket (another end, a later upload) needs no ticket of its own,
  // unless that ticket's repair was recorded before the reading was confirmed: then it reads a new fault.
  const repaired = await repairTimes([...taken]);
  const lengths = new Map((await CableRun.findAll({ where: { id: [...new Set(findings.map((f) => f.cableRunId))] }, attributes: ['id', 'installedLengthM'] })).map((r) => [r.id, r.installedLengthM]));
  const near = (o: Finding, f: Finding) => o.cableRunId === f.cableRunId && sameFault(o, f, lengths.get(f.cableRunId) ?? 0);
  const covered = (f: Finding) => {
    if (taken.has(f.id)) return true;
    const repairs = findings.filter((r) => repaired.has(r.id) && near(r, f)).map((r) => repaired.get(r.id)!);
    return findings.some((o) => taken.has(o.id) && near(o, f) && !repairedBetween(o, f, repairs));
  };
  return findings
    .filter((f) => !covered(f))
    .slice(0, limit)
    .map((f) => ({ ...findingView(f), site: { id: f.siteId, name: f.site?.name ?? '' }, cableRun: { id: f.cableRunId, name: f.cableRun?.name ?? '' } }));
}
