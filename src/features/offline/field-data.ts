/**
 * The field data a technician needs without signal — sites, cable runs with
 * their route markers, the cable library, and the open repairs assigned to
 * them — read through the API as the signed-in user (so the server decides
 * what they may see) and kept on the phone for that user only.
 */
import type { CableTypeView } from '../../../shared/schemas/cables';
import type { CableRunView, SiteSummary } from '../../../shared/schemas/sites';
import type { TicketDetail, TicketSummary } from '../../../shared/schemas/tickets';
import type { Page } from '../../../shared/schemas/users';
import { api } from '../../lib/api-client';
import type { FieldData } from './device-db';

/** Every page of a list. */
async function all<T>(path: string, pageSize: number, query: Record<string, string | number> = {}): Promise<T[]> {
  const items: T[] = [];
  for (let page = 1; ; page++) {
    const p = await api<Page<T>>(path, { query: { ...query, page, pageSize } });
    items.push(...p.items);
    if (p.items.length === 0 || items.length >= p.total) return items;
  }
}

/** At most this many of a person's open repairs are kept on the phone (the first page of their list, theirs first). */
export const FIELD_TICKETS_MAX = 25;

/** How one whole ticket is read: by default straight from the API; the app passes its query cache's reader. */
export type TicketReader = (id: number) => Promise<TicketDetail>;
const ticketFromApi: TicketReader = (id) => api<TicketDetail>(`/api/tickets/${id}`);

/** The open repair tickets assigned to this user, each whole, as the ticket page reads them; none for a role without tickets. */
async function myOpenTickets(withTickets: boolean, readTicket: TicketReader): Promise<TicketDetail[]> {
  if (!withTickets) return [];
  const list = await api<Page<TicketSummary>>('/api/tickets', {
    query: { status: 'open', assignee: 'me', page: 1, pageSize: FIELD_TICKETS_MAX },
  });
  return Promise.all(list.items.map((t) => readTicket(t.id)));
}

/**
 * `readTicket` lets the app read each ticket through its query cache (the ticket page's own query), so a ticket the
 * page is loading, or loaded moments ago, is not asked for a second time when the field data is refreshed with it.
 */
export async function fetchFieldData(userId: number, withTickets: boolean, now = new Date(), readTicket: TicketReader = ticketFromApi): Promise<FieldData> {
  const [sites, runs, cables, tickets] = await Promise.all([
    all<SiteSummary>('/api/sites', 100),
    all<CableRunView>('/api/cable-runs', 200),
    all<CableTypeView>('/api/cables', 200, { sort: 'name', dir: 'asc' }),
    myOpenTickets(withTickets, readTicket),
  ]);
  return { userId, savedAt: now.toISOString(), sites, runs, cables, tickets };
}

/** Field data older than this is fetched again when the phone is online. */
export const FIELD_DATA_FRESH_MS = 10 * 60_000;
