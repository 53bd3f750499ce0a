import type { Transaction } from 'sequelize';
import type { SessionUser } from '../auth/guards';
import type { AppContext } from '../context';
import { Ticket, TicketEvent, User } from '../db/models';
import { AppError } from '../errors';
import { mailTicket } from '../tickets/tickets.mail';
import { ROLE_LABELS } from '../../shared/auth/permissions';
import { OPEN_STATUSES, type TicketStatus } from '../../shared/tickets/status';
import type { OpenRepairsView } from '../../shared/schemas/users';

/** Repairs another technician can pick up: not yet fixed. A fixed ticket waits for a supervisor, not its assignee. */
const HANDED_OVER: readonly TicketStatus[] = ['raised', 'assigned', 'under-way'];

/** The open repair tickets assigned to a person, for the administrator deciding whether to hand them over. */
export async function openRepairsOf(userId: number): Promise<OpenRepairsView> {
  const user = await User.findByPk(userId);
  if (!user) throw AppError.notFound(`User ${userId}`);
  const tickets = await Ticket.findAll({ where: { assigneeId: userId, status: [...OPEN_STATUSES] }, order: [['id', 'ASC']] });
  return {
    userId,
    tickets: tickets.map((t) => ({ id: t.id, title: t.title, status: t.status, movable: HANDED_OVER.includes(t.status) })),
  };
}

/**
 * Gives every open repair of one person (raised, assigned or under way) to
 * another active technician, in one transaction: each ticket starts again
 * from "assigned" with its new assignee, its timeline says who handed it
 * over, and both people are e-mailed as for any change of assignee.
 */
export async function handOverRepairs(ctx: AppContext, fromUserId: number, toUserId: number, actor: SessionUser) {
  if (fromUserId === toUserId) {
    throw new AppError(422, 'same_person', 'Choose someone else to take the repairs over.', { fields: [{ field: 'toUserId', message: 'must be another person' }] });
  }
  return ctx.sequelize.transaction(async (transaction) => {
    const from = await User.findByPk(fromUserId, { transaction });
    if (!from) throw AppError.notFound(`User ${fromUserId}`);
    // Held as a ticket's assignee is (see checkAssignee in tickets.service.ts): a deactivation at the same moment waits.
    const to = await User.findByPk(toUserId, { transaction, lock: transaction.LOCK.SHARE });
    if (!to || !to.active || to.role !== 'technician') {
      throw new AppError(422, 'not_a_technician', `${to?.name ?? `User ${toUserId}`} is not an active field technician.`, {
        fields: [{ field: 'toUserId', message: 'must be an active field technician' }],
      });
    }
    // Held (FOR UPDATE on PostgreSQL; SQLite writes one at a time) until they are moved, as every change to a ticket
    // holds it: a close-out or a status step at the same moment comes first (and the ticket, no longer open, is not
    // taken), or waits and finds the ticket with its new assignee.
    const tickets = await Ticket.findAll({
      where: { assigneeId: fromUserId, status: [...HANDED_OVER] },
      order: [['id', 'ASC']],
      lock: transaction.LOCK.UPDATE,
      transaction,
    });
    for (const t of tickets) {
      const fromStatus = t.status;
      await t.update({ assigneeId: to.id, status: 'assigned' }, { transaction });
      await TicketEvent.create(
        {
          ticketId: t.id,
          actorId: actor.id,
          kind: 'assigned',
          fromStatus,
          toStatus: 'assigned',
          comment: `Handed over from ${from.name} to ${to.name}.`,
          changes: JSON.stringify({ assignee: [from.name, to.name] }),
        },
        { transaction },
      );
      await mailTicket(ctx, t.id, actor, { kind: 'unassigned', to: from }, transaction);
      await mailTicket(ctx, t.id, actor, { kind: 'assigned' }, transaction);
    }
    return { moved: tickets.map((t) => t.id), to: { id: to.id, name: to.name } };
  });
}

/**
 * A technician given another role no longer works repairs (only an active technician may be a ticket's assignee):
 * inside the transaction that changes the role, each of their repairs not yet fixed goes back to "raised" with no
 * assignee, for a supervisor to give to someone else. Its timeline says why, and the person is told it is no longer
 * theirs. A fixed ticket stays as it is: it waits for a supervisor's sign-off, not for its assignee.
 */
export async function releaseRepairsOf(ctx: AppContext, person: User, actor: SessionUser, transaction: Transaction): Promise<number[]> {
  // Held as every change to a ticket holds it (FOR UPDATE on PostgreSQL; SQLite writes one at a time).
  const tickets = await Ticket.findAll({
    where: { assigneeId: person.id, status: [...HANDED_OVER] },
    order: [['id', 'ASC']],
    lock: transaction.LOCK.UPDATE,
    transaction,
  });
  const label = ROLE_LABELS[person.role].toLowerCase();
  const role = `${/^[aeiou]/.test(label) ? 'an' : 'a'} ${label}`;
  for (const t of tickets) {
    const fromStatus = t.status;
    await t.update({ assigneeId: null, status: 'raised' }, { transaction });
    await TicketEvent.create(
      {
        ticketId: t.id,
        actorId: actor.id,
        kind: 'assigned',
        fromStatus,
        toStatus: 'raised',
        comment: `${person.name} is now ${role} and no longer works repairs: the ticket waits for a supervisor to assign it.`,
        changes: JSON.stringify({ assignee: [person.name, null] }),
      },
      { transaction },
    );
    await mailTicket(ctx, t.id, actor, { kind: 'unassigned', to: person }, transaction);
  }
  return tickets.map((t) => t.id);
}
