/**
 * How long a ticket has been open, in whole days of 24 hours since it was
 * raised: a ticket raised at 23:39 is "under a day" old at 00:00, not one day.
 */
export const DAY_MS = 24 * 60 * 60 * 1000;

export function openDays(raisedAt: Date | string, now: Date): number {
  const elapsed = now.getTime() - new Date(raisedAt).getTime();
  return Math.max(0, Math.floor(elapsed / DAY_MS));
}

/** "under a day", "1 day", "12 days". */
export function openDaysText(days: number): string {
  return days < 1 ? 'under a day' : days === 1 ? '1 day' : `${days} days`;
}
