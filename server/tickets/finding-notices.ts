import type { AppContext } from '../context';
import { findingEvents } from '../findings/events';
import { mailFindingConfirmed } from './tickets.mail';

/** E-mail the site's supervisors whenever a finding is confirmed; unsubscribes on close. */
export function subscribeFindingNotices(ctx: AppContext) {
  const listener = (findingId: number) =>
    mailFindingConfirmed(ctx, findingId).catch((err: unknown) => ctx.log(`finding ${findingId}: could not queue the supervisors' e-mail`, err));
  findingEvents.on('confirmed', listener);
  ctx.onClose.unshift(() => {
    findingEvents.off('confirmed', listener);
  });
}
