import { can } from '../../shared/auth/permissions';
import type { RoutePosition } from '../../shared/field/route-position';
import type { MailJobView } from '../../shared/schemas/outbox';
import type { CloseoutView, TicketDetail, TicketEventView, TicketFindingView, TicketSummary } from '../../shared/schemas/tickets';
import { allowedMoves, isOpen, mayCloseOut } from '../../shared/tickets/status';
import type { SessionUser } from '../auth/guards';
import type { Finding, MailJob, Ticket, TicketCloseout, TicketEvent, Trace, User } from '../db/models';
import { mailJobView } from '../outbox/outbox.service';

const person = (u: { id: number; name: string } | null | undefined, fallbackId: number) => (u ? { id: u.id, name: u.name } : { id: fallbackId, name: `#${fallbackId}` });
const iso = (d: Date | string) => new Date(d).toISOString();

export function findingView(f: Finding & { trace?: Trace; confirmedBy?: User }): TicketFindingView {
  return {
    id: f.id,
    kind: f.kind,
    note: f.note,
    traceId: f.traceId,
    eventIndex: f.eventIndex,
    measuredFrom: (f.trace?.end ?? 'A') as 'A' | 'B',
    roundTripNs: f.roundTripNs,
    distanceM: f.distanceM,
    uncertaintyM: f.uncertaintyM,
    windowStartM: f.windowStartM,
    windowEndM: f.windowEndM,
    routePosition: (f.routePosition as RoutePosition | null) ?? null,
    routePositionText: f.routePositionText,
    vf: f.trace?.vf ?? 0,
    confirmedBy: person(f.confirmedBy, f.confirmedById),
    confirmedAt: iso(f.confirmedAt),
  };
}

export function eventView(e: TicketEvent): TicketEventView {
  return {
    id: e.id,
    kind: e.kind,
    actor: person(e.actor, e.actorId),
    at: iso(e.createdAt),
    fromStatus: e.fromStatus,
    toStatus: e.toStatus,
    comment: e.comment,
    changes: e.changes ? (JSON.parse(e.changes) as TicketEventView['changes']) : null,
  };
}

export function closeoutView(c: TicketCloseout): CloseoutView {
  return {
    id: c.id,
    findingId: c.findingId,
    method: c.method,
    markerLabel: c.markerLabel,
    offsetM: c.offsetM,
    fromEnd: c.fromEnd,
    enteredDistanceM: c.enteredDistanceM,
    measuredFrom: c.measuredFrom,
    foundDistanceM: c.foundDistanceM,
    foundFromAM: c.foundFromAM,
    foundChainageM: c.foundChainageM,
    locatedDistanceM: c.locatedDistanceM,
    errorM: c.errorM,
    errorFraction: c.foundDistanceM > 0 ? Math.abs(c.errorM) / c.foundDistanceM : null,
    roundTripNs: c.roundTripNs,
    traceVf: c.traceVf,
    impliedVf: c.impliedVf,
    cause: c.cause,
    workDone: c.workDone,
    calibrationId: c.calibrationId,
    recordedBy: person(c.recordedBy, c.recordedById),
    recordedAt: iso(c.createdAt),
  };
}

/**
 * The e-mails about a ticket (recipients, delivery state, the relay's last
 * error) for those who may read the Outbox; an empty list for everyone else.
 */
export function mailDetailsFor(viewer: SessionUser, jobs: MailJob[]): MailJobView[] {
  return can(viewer.role, 'outbox:read') ? jobs.map(mailJobView) : [];
}

/** A mail job that has failed, or is being retried after a failure. */
export const mailInTrouble = (j: MailJob) => j.status === 'failed' || (j.status === 'queued' && j.attempts > 0);

export function summaryView(t: Ticket, viewer: SessionUser, extra: { findingCount: number; mailTrouble: boolean }): TicketSummary {
  return {
    id: t.id,
    title: t.title,
    status: t.status,
    priority: t.priority,
    dueDate: t.dueDate,
    assignee: t.assigneeId ? person(t.assignee, t.assigneeId) : null,
    site: person(t.site, t.siteId),
    cableRun: person(t.cableRun, t.cableRunId),
    findingCount: extra.findingCount,
    createdAt: iso(t.createdAt),
    updatedAt: iso(t.updatedAt),
    mailTrouble: extra.mailTrouble,
    mine: t.assigneeId === viewer.id,
  };
}

export function permissionsFor(t: Ticket, viewer: SessionUser): TicketDetail['can'] {
  const who = { isAssignee: t.assigneeId === viewer.id && can(viewer.role, 'tickets:work'), isSupervisor: can(viewer.role, 'tickets:manage') };
  return {
    edit: who.isSupervisor && ['raised', 'assigned', 'under-way'].includes(t.status),
    moves: allowedMoves(t.status, who).map((m) => ({ to: m.to, label: m.label })),
    closeOut: mayCloseOut(t.status, who),
    comment: (who.isAssignee || who.isSupervisor) && (isOpen(t.status) || t.status === 'signed-off'),
  };
}
