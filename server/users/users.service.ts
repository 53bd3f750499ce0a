import { Op } from 'sequelize';
import { containsText } from '../db/search';
import type { z } from 'zod';
import type { CreateUserSchema, UpdateUserSchema } from '../../shared/schemas/users';
import { OPEN_STATUSES } from '../../shared/tickets/status';
import { Session, Ticket, User } from '../db/models';
import { AppError } from '../errors';
import { hashPassword, temporaryPassword } from '../auth/passwords';

export async function listUsers(opts: { q?: string; page: number; pageSize: number }) {
  const where = opts.q
    ? { [Op.or]: [{ name: containsText(User.sequelize!, opts.q) }, { email: containsText(User.sequelize!, opts.q.toLowerCase()) }] }
    : {};
  const { rows, count } = await User.findAndCountAll({
    where,
    order: [['name', 'ASC']],
    limit: opts.pageSize,
    offset: (opts.page - 1) * opts.pageSize,
  });
  return { items: rows.map((u) => u.toPublic()), total: count, page: opts.page, pageSize: opts.pageSize };
}

export async function createUser(input: z.output<typeof CreateUserSchema>) {
  if (await User.findOne({ where: { email: input.email } })) {
    throw new AppError(409, 'email_taken', `A user with e-mail ${input.email} already exists.`, {
      fields: [{ field: 'email', message: 'is already in use' }],
    });
  }
  const password = temporaryPassword();
  const user = await User.create({
    email: input.email,
    name: input.name,
    role: input.role,
    phone: input.phone ?? null,
    passwordHash: await hashPassword(password),
    mustChangePassword: true,
  });
  return { user: user.toPublic(), temporaryPassword: password };
}

export async function updateUser(id: number, input: z.output<typeof UpdateUserSchema>, actingUserId: number) {
  const user = await User.findByPk(id);
  if (!user) throw AppError.notFound(`User ${id}`);
  if (id === actingUserId && (input.active === false || (input.role && input.role !== 'admin'))) {
    throw AppError.badRequest('cannot_demote_self', 'You cannot deactivate yourself or take away your own admin role.');
  }
  await user.update(input);
  if (input.active === false) await endSessions(id);
  // Deactivating someone does not take their repairs away silently: say how many are still theirs.
  const openTickets = await Ticket.count({ where: { assigneeId: id, status: [...OPEN_STATUSES] } });
  return { ...user.toPublic(), openTicketCount: openTickets };
}

export async function resetPassword(id: number) {
  const user = await User.findByPk(id);
  if (!user) throw AppError.notFound(`User ${id}`);
  const password = temporaryPassword();
  await user.update({ passwordHash: await hashPassword(password), mustChangePassword: true });
  await endSessions(id);
  return { user: user.toPublic(), temporaryPassword: password };
}

export async function endSessions(userId: number) {
  await Session.destroy({ where: { userId } });
}

export async function assignableTechnicians() {
  const users = await User.findAll({ where: { active: true, role: 'technician' }, order: [['name', 'ASC']] });
  return users.map((u) => ({ id: u.id, name: u.name, email: u.email }));
}
