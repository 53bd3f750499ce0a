import type { DashboardView } from '../../shared/schemas/tickets';
import { openDays } from '../../shared/tickets/age';
import { OPEN_STATUSES, TICKET_PRIORITIES } from '../../shared/tickets/status';
import { CableType, Ticket, TicketCloseout } from '../db/models';
import { unticketedFindings } from '../tickets/tickets.service';
import { methodAccuracy } from '../findings/method-scores';

export const AGE_BUCKETS = [
  { label: 'Under a day', maxDays: 0 },
  { label: '1–7 days', maxDays: 7 },
  { label: '8–28 days', maxDays: 28 },
  { label: 'Over 4 weeks', maxDays: Infinity },
] as const;

/** What a supervisor looks at first: open work by age and priority, findings nobody has picked up, and how well readings matched digs. */
export async function dashboard(now = new Date()): Promise<DashboardView> {
  const open = await Ticket.findAll({
    where: { status: [...OPEN_STATUSES] },
    include: [
      { association: 'site', attributes: ['id', 'name'] },
      { association: 'assignee', attributes: ['id', 'name'] },
    ],
    order: [['createdAt', 'ASC']],
  });
  const byAge = AGE_BUCKETS.map((b) => ({ label: b.label, counts: Object.fromEntries(TICKET_PRIORITIES.map((p) => [p, 0])) as Record<(typeof TICKET_PRIORITIES)[number], number> }));
  const oldest = open.map((t) => {
    const ageDays = openDays(t.createdAt, now);
    const bucket = AGE_BUCKETS.findIndex((b) => ageDays <= b.maxDays);
    byAge[bucket].counts[t.priority] += 1;
    return {
      id: t.id,
      title: t.title,
      status: t.status,
      priority: t.priority,
      ageDays,
      dueDate: t.dueDate,
      overdue: t.dueDate !== null && t.dueDate < now.toISOString().slice(0, 10),
      site: { id: t.siteId, name: t.site?.name ?? '' },
      assignee: t.assignee ? { id: t.assignee.id, name: t.assignee.name } : null,
    };
  });

  // The latest close-out of each ticket that was not withdrawn.
  const closeouts = await TicketCloseout.findAll({ order: [['id', 'DESC']] });
  const withdrawn = new Set(
    (await Ticket.findAll({ where: { status: 'withdrawn' }, attributes: ['id'] })).map((t) => t.id),
  );
  const latest = new Map<number, TicketCloseout>();
  for (const c of closeouts) if (!withdrawn.has(c.ticketId) && !latest.has(c.ticketId)) latest.set(c.ticketId, c);
  const groups = new Map<number, TicketCloseout[]>();
  for (const c of latest.values()) groups.set(c.cableTypeId, [...(groups.get(c.cableTypeId) ?? []), c]);
  const types = groups.size ? await CableType.findAll({ where: { id: [...groups.keys()] } }) : [];
  const mean = (xs: number[]) => (xs.length ? xs.reduce((a, b) => a + b, 0) / xs.length : null);
  const accuracy = [...groups.entries()]
    .map(([cableTypeId, cs]) => {
      const type = types.find((t) => t.id === cableTypeId);
      const vfs = cs.map((c) => c.impliedVf).filter((v): v is number => v !== null);
      return {
        cableType: { id: cableTypeId, name: type?.name ?? `#${cableTypeId}` },
        count: cs.length,
        meanErrorM: mean(cs.map((c) => c.errorM))!,
        meanAbsErrorM: mean(cs.map((c) => Math.abs(c.errorM)))!,
        meanAbsErrorPercent: mean(cs.filter((c) => c.foundDistanceM > 0).map((c) => (100 * Math.abs(c.errorM)) / c.foundDistanceM)),
        meanImpliedVf: mean(vfs),
        libraryVf: type?.vf ?? null,
      };
    })
    .sort((a, b) => a.cableType.name.localeCompare(b.cableType.name));

  const unticketed = await unticketedFindings(20);
  return { generatedAt: now.toISOString(), openCount: open.length, awaitingSignOff: open.filter((t) => t.status === 'fixed').length, byAge, oldest: oldest.slice(0, 20), unticketed, accuracy, methodAccuracy: await methodAccuracy() };
}
