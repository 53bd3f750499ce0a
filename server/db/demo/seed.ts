import type { AppContext } from '../../context';
import { hashPassword } from '../../auth/passwords';
import { User } from '../models';
import { DEMO_CABLE_TYPE_NAMES, seedCableTypes } from './cables';
import { seedField, seedFieldTraces } from './field';
import { seedFaultLocatedThreeWays } from './locate';
import { DEMO_PASSWORD, DEMO_USERS } from './organisation';
import { seedTickets } from './tickets';

/**
 * Seeds the invented demo scenario into an empty database. Each feature adds
 * its own step below, in dependency order; a step gets the users by e-mail.
 */
export async function seedDemo(ctx: AppContext): Promise<boolean> {
  if ((await User.count()) > 0) return false;
  const hash = await hashPassword(DEMO_PASSWORD);
  const users = new Map<string, User>();
  let fieldRuns: Awaited<ReturnType<typeof seedField>> = [];
  await ctx.sequelize.transaction(async (transaction) => {
    for (const u of DEMO_USERS) {
      users.set(u.email, await User.create({ ...u, passwordHash: hash }, { transaction }));
    }
    // Before sites and cable runs, which refer to cable types by name.
    await seedCableTypes(ctx, transaction);
    fieldRuns = await seedField(users, transaction);
  });
  // Traces go through the upload service, which keeps its own transaction per upload.
  const field = await seedFieldTraces(ctx, users, fieldRuns);
  // One fault located three ways (two traces and a bridge reading) with its repair ticket, before the other
  // tickets take findings of their own.
  const located = await seedFaultLocatedThreeWays(ctx, users);
  // Tickets go through the tickets service, after the findings they are raised from.
  const repairs = await seedTickets(ctx, users);
  ctx.log(`Demo data seeded: ${DEMO_USERS.length} users (password "${DEMO_PASSWORD}"), ${DEMO_CABLE_TYPE_NAMES.length} cable types, ${fieldRuns.length} cable runs, ${field.traces} traces, ${repairs.tickets + located.tickets} repair tickets, ${located.measurements} bridge reading.`);
  return true;
}
