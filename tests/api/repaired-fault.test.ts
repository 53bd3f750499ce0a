import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { BestLocationView } from '../../shared/schemas/measurements';
import { startApi, type Client, type TestApi } from './support/api';
import { confirmedFinding, supervisedRun } from './tickets.support';

interface FindingBody {
  id: number;
  tickets: Array<{ id: number; status: string }>;
  bestLocation: BestLocationView | null;
}

/**
 * A fault is repaired and its ticket closed out; later a trace of the same run
 * shows a fault near the same place. That reading was taken after the repair:
 * a new fault (or a repair that did not hold), which needs a ticket of its own
 * and is not averaged with the readings from before the repair.
 */
describe('a fault found again after its repair', () => {
  let api: TestApi;
  let sup: Client;
  let tech: Client;
  let fx: Awaited<ReturnType<typeof supervisedRun>>;
  let before: Awaited<ReturnType<typeof confirmedFinding>>;
  let alsoBefore: Awaited<ReturnType<typeof confirmedFinding>>;
  let ticketId: number;

  beforeAll(async () => {
    api = await startApi();
    sup = await api.as('supervisor');
    tech = await api.as('technician');
    fx = await supervisedRun(api, 'Repaired run');
    before = await confirmedFinding(api, fx.run.id, 100);
    // A second reading of the same fault before the repair, from the other end.
    alsoBefore = await confirmedFinding(api, fx.run.id, 99, 'B');
    const t = await sup.post('/api/tickets', { findingIds: [before.id], assigneeId: api.users.technician.id }).expect(201);
    ticketId = t.body.id;
  });
  afterAll(() => api?.close());

  const unticketedIds = async () => ((await sup.get('/api/tickets/unticketed-findings').expect(200)).body as Array<{ id: number }>).map((f) => f.id);
  const findingBody = async (id: number) => (await sup.get(`/api/findings/${id}`).expect(200)).body as FindingBody;

  it('counts a reading from before the repair as on the ticket', async () => {
    expect(await unticketedIds()).not.toContain(alsoBefore.id);
    expect((await findingBody(alsoBefore.id)).tickets.map((t) => t.id)).toEqual([ticketId]);
  });

  it('lists a reading confirmed after the close-out as without a ticket, alone in its best location', async () => {
    await tech.post(`/api/tickets/${ticketId}/status`, { to: 'under-way' }).expect(200);
    await tech.post(`/api/tickets/${ticketId}/closeout`, { found: { method: 'distance', fromEnd: 'A', distanceM: 100 }, cause: 'other', workDone: 'Jointed' }).expect(200);
    // Confirmation times are stored to the millisecond: the next reading is surely later than the close-out.
    await new Promise((r) => setTimeout(r, 20));
    const after = await confirmedFinding(api, fx.run.id, 101);

    expect(await unticketedIds()).toContain(after.id);
    expect(await unticketedIds()).not.toContain(alsoBefore.id);
    const body = await findingBody(after.id);
    expect(body.tickets).toEqual([]);
    expect(body.bestLocation!.methods.map((m) => m.label)).toEqual([`TDR from end A (finding ${after.id})`]);

    // The readings from before the repair still make one location of the repaired fault, without the new one.
    const old = await findingBody(before.id);
    expect(old.tickets.map((t) => t.id)).toEqual([ticketId]);
    expect(old.bestLocation!.methods.map((m) => m.label)).toEqual([
      `TDR from both ends (findings ${before.id} and ${alsoBefore.id})`,
      `TDR from end A (finding ${before.id})`,
      `TDR from end B (finding ${alsoBefore.id})`,
    ]);
  });

  it('puts the new fault on a ticket of its own', async () => {
    const [after] = await unticketedIds();
    const t = await sup.post('/api/tickets', { findingIds: [after] }).expect(201);
    expect(t.body.id).not.toBe(ticketId);
    expect(await unticketedIds()).toEqual([]);
  });
});
