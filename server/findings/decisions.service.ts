import type { Transaction } from 'sequelize';
import type { z } from 'zod';
import type { FindingDecisionView, FindingReverseSchema } from '../../shared/schemas/finding-decisions';
import type { FindingStatus, FindingView } from '../../shared/schemas/findings';
import { OPEN_STATUSES } from '../../shared/tickets/status';
import type { SessionUser } from '../auth/guards';
import type { AppContext } from '../context';
import { Finding, FindingDecision, Ticket, TicketFinding } from '../db/models';
import { AppError } from '../errors';
import { emitFindingConfirmed } from './events';
import { getFinding } from './findings.service';
import { mailFindingConfirmed } from '../tickets/tickets.mail';

export function decisionView(d: FindingDecision): FindingDecisionView {
  return {
    id: d.id,
    action: d.action,
    fromStatus: d.fromStatus,
    toStatus: d.toStatus,
    kind: d.kind,
    reason: d.reason,
    decidedBy: { id: d.decidedById, name: d.decidedBy?.name ?? `user ${d.decidedById}` },
    at: new Date(d.createdAt).toISOString(),
  };
}

/** An event's decisions, oldest first: the first one and every reversal with its reason. */
export async function decisionHistory(findingId: number): Promise<FindingDecisionView[]> {
  if (!(await Finding.findByPk(findingId, { attributes: ['id'] }))) throw AppError.notFound(`Finding ${findingId}`);
  const rows = await FindingDecision.findAll({
    where: { findingId },
    include: [{ association: 'decidedBy', attributes: ['id', 'name'] }],
    order: [
      ['createdAt', 'ASC'],
      ['id', 'ASC'],
    ],
  });
  return rows.map(decisionView);
}

/**
 * A supervisor turns a confirmed event into a dismissed one, or a dismissed one
 * into a confirmed fault, with a reason kept in the event's history. The
 * request names the status it wants: one that is already the finding's
 * (someone reversed it meanwhile, or the request was sent twice) is refused
 * with 409 `decision_changed` and changes nothing. A fault
 * on an open repair ticket is not dismissed under the crew's feet: the ticket
 * is withdrawn or closed first. A new confirmation tells the site's
 * supervisors, as a first one does.
 */
export async function reverseDecision(
  ctx: AppContext,
  findingId: number,
  input: z.output<typeof FindingReverseSchema>,
  reviewer: SessionUser,
): Promise<{ finding: FindingView; history: FindingDecisionView[] }> {
  const to = await ctx.sequelize.transaction(async (transaction) => {
    // Held until the decision is stored, as createTicket holds it: a ticket raised for the finding at the same
    // moment either comes first (and the dismissal sees it) or sees the finding dismissed.
    const finding = await Finding.findByPk(findingId, { transaction, lock: transaction.LOCK.UPDATE });
    if (!finding) throw AppError.notFound(`Finding ${findingId}`);
    const from = finding.status;
    const to: FindingStatus = input.to;
    if (from === to) throw alreadyThere(findingId, to);
    let kind: string;
    if (to === 'dismissed') {
      const openTicketIds = await openTicketsOf(findingId, transaction);
      if (openTicketIds.length) {
        throw new AppError(
          409,
          'on_open_ticket',
          `Finding ${findingId} is on open repair ticket${openTicketIds.length > 1 ? 's' : ''} #${openTicketIds.join(', #')}: withdraw or close the ticket before dismissing it.`,
        );
      }
      kind = input.kind ?? 'not-a-fault';
    } else {
      const faultKind = input.kind ?? (finding.kind !== 'not-a-fault' ? finding.kind : undefined);
      if (!faultKind || faultKind === 'not-a-fault') {
        throw AppError.badRequest('kind_required', 'Say what kind of fault the event is when confirming it.', {
          fields: [{ field: 'kind', message: 'is required: what kind of fault it is' }],
        });
      }
      kind = faultKind;
    }
    // Conditional on the status read above, so of two reversals at once only one moves it (PostgreSQL runs them side by side).
    const [moved] = await Finding.update(
      { status: to, kind, confirmedById: reviewer.id, confirmedAt: new Date() },
      { where: { id: findingId, status: from }, transaction },
    );
    if (moved !== 1) throw alreadyThere(findingId, to);
    await FindingDecision.create(
      { findingId, action: 'reversed', fromStatus: from, toStatus: to, kind, reason: input.reason, decidedById: reviewer.id },
      { transaction },
    );
    // A new confirmation tells the site's supervisors as a first one does, in the same transaction.
    if (to === 'confirmed') await mailFindingConfirmed(ctx, findingId, transaction);
    return to;
  });
  ctx.security('finding-reversed', { findingId, actorId: reviewer.id, to, reason: input.reason });
  if (to === 'confirmed') emitFindingConfirmed(findingId, ctx.log);
  return { finding: await getFinding(findingId), history: await decisionHistory(findingId) };
}

function alreadyThere(findingId: number, to: FindingStatus): AppError {
  return new AppError(
    409,
    'decision_changed',
    `Finding ${findingId} is already ${to}: someone reversed it meanwhile, or this request was sent twice. Nothing was changed; reload the finding to see its history.`,
    { fields: [{ field: 'to', message: `the finding is already ${to}` }] },
  );
}

async function openTicketsOf(findingId: number, transaction: Transaction): Promise<number[]> {
  const links = await TicketFinding.findAll({ where: { findingId }, attributes: ['ticketId'], transaction });
  if (!links.length) return [];
  const tickets = await Ticket.findAll({ where: { id: links.map((l) => l.ticketId), status: [...OPEN_STATUSES] }, attributes: ['id'], transaction });
  return tickets.map((t) => t.id);
}
