import { AsyncLocalStorage } from 'node:async_hooks';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { listFindings } from '../../server/findings/findings.service';
import { FindingListQuerySchema } from '../../shared/schemas/findings';
import { startApi, type Client, type TestApi } from './support/api';
import { stepTraceCsv } from './support/field-fixtures';
import { confirmedFinding, supervisedRun } from './tickets.support';

type Row = { id: number; traceId: number; tickets: Array<{ id: number; title: string; status: string }> };

/**
 * The findings list names on each row the repair tickets acting on the finding,
 * as the finding's own page does: its own, those of other readings of the same
 * fault, none withdrawn, none from before a repair when the reading came after it.
 */
describe('the repair tickets on each row of the findings list', () => {
  let api: TestApi;
  let sup: Client;
  let tech: Client;
  const f: Record<string, { id: number }> = {};
  const t: Record<string, { id: number; title: string }> = {};

  const raise = async (findingIds: number[], title: string) =>
    (await sup.post('/api/tickets', { findingIds, title, assigneeId: api.users.technician.id }).expect(201)).body as { id: number; title: string };

  beforeAll(async () => {
    api = await startApi();
    sup = await api.as('supervisor');
    tech = await api.as('technician');
    const one = await supervisedRun(api, 'Listed run one');
    const two = await supervisedRun(api, 'Listed run two');

    // Run one (200 m): a fault at 100 m from A, read from both ends, each reading on a ticket of its own.
    f.a = await confirmedFinding(api, one.run.id, 100);
    f.b = await confirmedFinding(api, one.run.id, 99, 'B');
    t.first = await raise([f.a.id], 'Open near MH-2');
    t.second = await raise([f.b.id], 'Open near MH-2, from the pole');
    // A fault at 150 m from A whose first ticket was withdrawn and raised again; its reading from B has no ticket.
    f.c = await confirmedFinding(api, one.run.id, 150);
    f.cFromB = await confirmedFinding(api, one.run.id, 50, 'B');
    t.withdrawn = await raise([f.c.id], 'Raised twice');
    await sup.post(`/api/tickets/${t.withdrawn.id}/status`, { to: 'withdrawn', comment: 'Raised twice' }).expect(200);
    t.again = await raise([f.c.id], 'Open past P-7');
    // A fault at 50 m from A on no ticket, and a dismissed event.
    f.lone = await confirmedFinding(api, one.run.id, 50);
    const up = await tech
      .postRaw('/api/traces')
      .field('cableRunId', String(one.run.id))
      .field('end', 'A')
      .attach('file', Buffer.from(stepTraceCsv({ faultM: 70, vf: 0.66 })), 'A-70.csv')
      .expect(201);
    f.dismissed = (await tech.post('/api/findings', { traceId: up.body.traces[0].id, eventIndex: 0, status: 'dismissed', kind: 'not-a-fault' }).expect(201)).body;

    // Run two: a fault at 100 m repaired and closed out, then found again near the same place after the repair.
    f.repaired = await confirmedFinding(api, two.run.id, 100);
    t.repair = await raise([f.repaired.id], 'Open at the cabinet');
    await tech.post(`/api/tickets/${t.repair.id}/status`, { to: 'under-way' }).expect(200);
    await tech.post(`/api/tickets/${t.repair.id}/closeout`, { found: { method: 'distance', fromEnd: 'A', distanceM: 100 }, cause: 'other', workDone: 'Jointed' }).expect(200);
    // Confirmation times are stored to the millisecond: the next reading is surely later than the close-out.
    await new Promise((r) => setTimeout(r, 20));
    f.after = await confirmedFinding(api, two.run.id, 101);
  });
  afterAll(() => api?.close());

  const ticket = (x: { id: number; title: string }, status: string) => ({ id: x.id, title: x.title, status });

  it('lists each finding with the tickets of its fault, oldest first, and the same as its own page', async () => {
    const list = (await sup.get('/api/findings?pageSize=100').expect(200)).body as { total: number; items: Row[] };
    expect(list.total).toBe(8);
    const rows = new Map(list.items.map((r) => [r.id, r.tickets]));
    const both = [ticket(t.first, 'assigned'), ticket(t.second, 'assigned')];
    expect(rows.get(f.a.id)).toEqual(both);
    expect(rows.get(f.b.id)).toEqual(both);
    expect(rows.get(f.c.id)).toEqual([ticket(t.again, 'assigned')]);
    expect(rows.get(f.cFromB.id)).toEqual([ticket(t.again, 'assigned')]);
    expect(rows.get(f.lone.id)).toEqual([]);
    expect(rows.get(f.dismissed.id)).toEqual([]);
    expect(rows.get(f.repaired.id)).toEqual([ticket(t.repair, 'fixed')]);
    expect(rows.get(f.after.id)).toEqual([]);
    for (const row of list.items) {
      const own = (await sup.get(`/api/findings/${row.id}`).expect(200)).body as Row;
      expect(row.tickets).toEqual(own.tickets);
    }
  });

  it('reads the tickets of a page in as many queries for eight rows as for one', async () => {
    const sequelize = api.app.ctx.sequelize;
    const mine = new AsyncLocalStorage<true>();
    let count = 0;
    const counter = () => {
      if (mine.getStore()) count++;
    };
    const queriesFor = async (query: Record<string, string>) => {
      count = 0;
      const page = await mine.run(true, () => listFindings(FindingListQuerySchema.parse(query)));
      return { rows: page.items.length, queries: count };
    };
    sequelize.addHook('beforeQuery', 'count-list-queries', counter as never);
    try {
      // The row of the repaired fault takes every read there is: its reading from after the repair, its ticket,
      // and that ticket's close-out.
      const repairedTrace = (await sup.get(`/api/findings/${f.repaired.id}`).expect(200)).body.traceId as number;
      const one = await queriesFor({ traceId: String(repairedTrace) });
      const all = await queriesFor({ pageSize: '100' });
      expect(one.rows).toBe(1);
      expect(all.rows).toBe(8);
      // Reading each row's tickets on its own took three to eight queries per row.
      expect(one.queries).toBeGreaterThan(0);
      expect(all.queries).toBe(one.queries);
    } finally {
      sequelize.removeHook('beforeQuery', 'count-list-queries');
    }
  });
});
