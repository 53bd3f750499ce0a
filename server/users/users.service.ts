import { Op, UniqueConstraintError, type Transaction } from 'sequelize';
import { containsText } from '../db/search';
import type { z } from 'zod';
import type { CreateUserSchema, UpdateUserSchema } from '../../shared/schemas/users';
import { can } from '../../shared/auth/permissions';
import { OPEN_STATUSES } from '../../shared/tickets/status';
import type { SessionUser } from '../auth/guards';
import type { AppContext } from '../context';
import { Session, Ticket, User } from '../db/models';
import { AppError } from '../errors';
import { hashPassword, temporaryPassword } from '../auth/passwords';
import { releaseRepairsOf } from './hand-over.service';

export async function listUsers(opts: { q?: string; page: number; pageSize: number }) {
  const where = opts.q
    ? { [Op.or]: [containsText(User, 'name', opts.q), containsText(User, 'email', opts.q.toLowerCase())] }
    : {};
  const { rows, count } = await User.findAndCountAll({
    where,
    order: [['name', 'ASC']],
    limit: opts.pageSize,
    offset: (opts.page - 1) * opts.pageSize,
  });
  return { items: rows.map((u) => u.toPublic()), total: count, page: opts.page, pageSize: opts.pageSize };
}

/**
 * The request was allowed when it arrived; the actor may have lost the right since (another administrator took their
 * role away a moment ago). Read again inside the change's transaction, held (PostgreSQL: FOR SHARE, so a demotion at
 * the same moment waits or is seen; SQLite writes one at a time), so an account losing its administrator role
 * cannot make an administrator or hand out a temporary password on its way out.
 */
async function assertStillManagesUsers(ctx: AppContext, actorId: number, transaction: Transaction) {
  const lock = ctx.sequelize.getDialect() === 'postgres' ? transaction.LOCK.SHARE : undefined;
  const acting = await User.findByPk(actorId, { lock, transaction });
  if (!acting || !acting.active || !can(acting.role, 'users:manage')) {
    throw new AppError(409, 'no_longer_allowed', 'Your own account was changed a moment ago and may no longer manage users. Reload the page.');
  }
}

export async function createUser(ctx: AppContext, input: z.output<typeof CreateUserSchema>, actorId: number) {
  const taken = () =>
    new AppError(409, 'email_taken', `A user with e-mail ${input.email} already exists.`, {
      fields: [{ field: 'email', message: 'is already in use' }],
    });
  if (await User.findOne({ where: { email: input.email } })) throw taken();
  const password = temporaryPassword();
  const passwordHash = await hashPassword(password);
  // The same e-mail sent twice at once passes the check above both times: the unique index decides.
  const user = await ctx.sequelize
    .transaction(async (transaction) => {
      await assertStillManagesUsers(ctx, actorId, transaction);
      return User.create({ email: input.email, name: input.name, role: input.role, phone: input.phone ?? null, passwordHash, mustChangePassword: true }, { transaction });
    })
    .catch((err: unknown) => {
      throw err instanceof UniqueConstraintError ? taken() : err;
    });
  if (input.role === 'admin') ctx.security('admin-created', { userId: user.id, actorId, email: user.email });
  return { user: user.toPublic(), temporaryPassword: password };
}

/**
 * Changes a user's name, role, activity or phone. Whether at least one active
 * administrator remains is decided inside the transaction that makes the
 * change, with the administrators' rows locked (PostgreSQL; SQLite runs one
 * write transaction at a time), so two administrators demoting each other at
 * the same moment cannot both succeed.
 */
export async function updateUser(ctx: AppContext, id: number, input: z.output<typeof UpdateUserSchema>, actor: SessionUser) {
  if (id === actor.id && (input.active === false || (input.role && input.role !== 'admin'))) {
    throw AppError.badRequest('cannot_demote_self', 'You cannot deactivate yourself or take away your own admin role.');
  }
  const { user, before, unassignedTicketIds } = await ctx.sequelize.transaction(async (transaction) => {
    const lock = ctx.sequelize.getDialect() === 'postgres' ? transaction.LOCK.UPDATE : undefined;
    // The administrators first, always in id order, then the person: every such change takes its locks in one order.
    const admins = await User.findAll({ where: { role: 'admin', active: true }, attributes: ['id'], order: [['id', 'ASC']], lock, transaction });
    const user = await User.findByPk(id, { lock, transaction });
    if (!user) throw AppError.notFound(`User ${id}`);
    const before = { role: user.role, active: user.active };
    const stopsBeingAdmin = user.role === 'admin' && user.active && ((input.role !== undefined && input.role !== 'admin') || input.active === false);
    if (stopsBeingAdmin && !admins.some((a) => a.id !== user.id)) {
      throw new AppError(
        409,
        'last_admin',
        `${user.name} is the last active administrator: make someone else an administrator first, so Rholog always has one.`,
      );
    }
    await assertStillManagesUsers(ctx, actor.id, transaction);
    await user.update(input, { transaction });
    if (input.active === false) await Session.destroy({ where: { userId: id }, transaction });
    // Someone who is no longer a technician cannot work the repairs given to them: they go back to the supervisors.
    const unassignedTicketIds = before.role === 'technician' && user.role !== 'technician' ? await releaseRepairsOf(ctx, user, actor, transaction) : [];
    return { user, before, unassignedTicketIds };
  });
  if (input.role !== undefined && input.role !== before.role) {
    ctx.security('role-changed', { userId: id, actorId: actor.id, from: before.role, to: user.role });
  }
  if (input.active !== undefined && input.active !== before.active) {
    ctx.security(input.active ? 'user-reactivated' : 'user-deactivated', { userId: id, actorId: actor.id });
  }
  // Deactivating someone does not take their repairs away silently: say how many are still theirs.
  const openTickets = await Ticket.count({ where: { assigneeId: id, status: [...OPEN_STATUSES] } });
  return { ...user.toPublic(), openTicketCount: openTickets, unassignedTicketIds };
}

export async function resetPassword(ctx: AppContext, id: number, actorId: number) {
  const user = await User.findByPk(id);
  if (!user) throw AppError.notFound(`User ${id}`);
  const password = temporaryPassword();
  const passwordHash = await hashPassword(password);
  await ctx.sequelize.transaction(async (transaction) => {
    await assertStillManagesUsers(ctx, actorId, transaction);
    await user.update({ passwordHash, mustChangePassword: true }, { transaction });
    await Session.destroy({ where: { userId: id }, transaction });
  });
  ctx.security('password-reset', { userId: id, actorId });
  return { user: user.toPublic(), temporaryPassword: password };
}

export async function assignableTechnicians() {
  const users = await User.findAll({ where: { active: true, role: 'technician' }, order: [['name', 'ASC']] });
  return users.map((u) => ({ id: u.id, name: u.name, email: u.email }));
}
