import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { findingEvents } from '../../server/findings/events';
import { Finding, SiteSupervisor, Trace } from '../../server/db/models';
import { makeRun, stepTraceCsv } from './support/field-fixtures';
import { startApi, type TestApi } from './support/api';

let api: TestApi;
let fx: Awaited<ReturnType<typeof makeRun>>;

beforeAll(async () => {
  api = await startApi();
  fx = await makeRun('Finding run');
  await SiteSupervisor.create({ siteId: fx.site.id, userId: api.users.supervisor.id });
});
afterAll(() => api.close());

async function upload(end: 'A' | 'B', faultM: number) {
  const c = await api.as('technician');
  const res = await c.postRaw('/api/traces').field('cableRunId', String(fx.run.id)).field('end', end).attach('file', Buffer.from(stepTraceCsv({ faultM, vf: 0.66 })), `${end}.csv`).expect(201);
  return res.body.traces[0];
}

describe('POST /api/findings', () => {
  it('confirms an event with its route position, after slack, and tells listeners once committed', async () => {
    const trace = await upload('A', 100);
    const heard: number[] = [];
    const listener = (id: number) => heard.push(id);
    findingEvents.on('confirmed', listener);
    const c = await api.as('technician');
    const res = await c.post('/api/findings', { traceId: trace.id, eventIndex: 0, status: 'confirmed', kind: 'open-conductor', note: 'dig by the kerb' }).expect(201);
    findingEvents.off('confirmed', listener);
    const f = res.body;
    expect(heard).toEqual([f.id]);
    expect(f.siteId).toBe(fx.site.id);
    expect(f.status).toBe('confirmed');
    expect(f.confirmedBy.id).toBe(api.users.technician.id);
    // Hand-worked: 100 m of cable from A passes MH-1 (40 m, 2 m coiled) and MH-2 (80 m, 3 m coiled),
    // so it is 100 − 5 = 95 m along the route: 15 m past MH-2 toward P-7 (at 120 m).
    expect(f.routePosition.from.label).toBe('MH-2');
    expect(f.routePosition.toward.label).toBe('P-7');
    expect(f.routePosition.offsetM).toBeCloseTo(15, 0);
    expect(f.routePositionText).toMatch(/^15\.\d m past manhole MH-2 toward pedestal P-7; dig on the ground 1\d\.\d–1\d\.\d m past MH-2$/);
    expect(f.windowStartM).toBeLessThan(f.distanceM);
    expect(f.windowEndM).toBeGreaterThan(f.distanceM);
    const again = await c.post('/api/findings', { traceId: trace.id, eventIndex: 0, status: 'dismissed', kind: 'other' }).expect(409);
    expect(again.body.error.code).toBe('already_decided');
  });

  it('does not tell listeners about a dismissal, and a planner may not decide', async () => {
    const trace = await upload('A', 70);
    const heard: number[] = [];
    const listener = (id: number) => heard.push(id);
    findingEvents.on('confirmed', listener);
    await (await api.as('planner')).post('/api/findings', { traceId: trace.id, eventIndex: 0, status: 'dismissed', kind: 'other' }).expect(403);
    await (await api.as('supervisor')).post('/api/findings', { traceId: trace.id, eventIndex: 0, status: 'dismissed', kind: 'not-a-fault' }).expect(201);
    findingEvents.off('confirmed', listener);
    expect(heard).toEqual([]);
  });

  it('names the field that is wrong', async () => {
    const trace = await upload('A', 50);
    const c = await api.as('technician');
    const res = await c.post('/api/findings', { traceId: trace.id, eventIndex: 7, status: 'confirmed', kind: 'open-conductor' }).expect(422);
    expect(res.body.error.fields[0].field).toBe('eventIndex');
    const kind = await c.post('/api/findings', { traceId: trace.id, eventIndex: 0, status: 'confirmed', kind: 'gremlins' }).expect(400);
    expect(kind.body.error.fields[0].field).toBe('kind');
  });

  it('refuses a record whose time axis spans 1e302 ns, naming the time column and line', async () => {
    const rows = Array.from({ length: 600 }, (_, i) => `${i * 1e300},${i > 300 ? 0.9 : 0.4}`);
    const c = await api.as('technician');
    const res = await c
      .postRaw('/api/traces')
      .field('cableRunId', String(fx.run.id))
      .field('end', 'A')
      .attach('file', Buffer.from(['time_ns,volts', ...rows].join('\n')), 'long.csv')
      .expect(422);
    expect(res.body.error.code).toBe('trace_unreadable');
    const stored = res.body.error.traces[0];
    expect(stored.error.code).toBe('IMPLAUSIBLE_TIME_AXIS');
    // Header on line 1, 600 samples: the last is on line 601.
    expect(stored.error.line).toBe(601);
    expect(stored.error.message).toContain("time column 'time_ns'");
  });

  it('refuses, with a 422 and no finding, an event whose stored values are not finite numbers', async () => {
    const trace = await upload('A', 60);
    const row = (await Trace.findByPk(trace.id))!;
    const analysis = structuredClone(row.analysis)!;
    // What an analysis of an overflowing time axis stored: the window's NaN became null in JSON.
    analysis.events[0] = { ...analysis.events[0], distanceM: 3.04e301, uncertaintyM: null as unknown as number, windowEndM: null as unknown as number };
    await row.update({ analysis });
    const c = await api.as('technician');
    const res = await c.post('/api/findings', { traceId: trace.id, eventIndex: 0, status: 'confirmed', kind: 'open-conductor' }).expect(422);
    expect(res.body.error.code).toBe('implausible_event');
    expect(res.body.error.fields[0].field).toBe('eventIndex');
    expect(await Finding.count({ where: { traceId: trace.id } })).toBe(0);
  });
});

describe('two-ended location', () => {
  it('combines a reading from each end independently of the velocity factor', async () => {
    // An open seen 120 m from A and 80 m from B on the 200 m run.
    const a = await upload('A', 120);
    const b = await upload('B', 80);
    const c = await api.as('technician');
    const res = await c.get(`/api/findings/two-ended?traceA=${a.id}&eventA=0&traceB=${b.id}&eventB=0`).expect(200);
    // d_A = L·t_A/(t_A + t_B) = 200 × 120/(120 + 80) = 120 m (hand-worked; the times are proportional to the distances).
    expect(res.body.distanceFromAM).toBeCloseTo(120, 0);
    expect(res.body.impliedVf).toBeCloseTo(0.66, 2);
    expect(Math.abs(res.body.disagreementAM)).toBeLessThan(1);
    const wrong = await c.get(`/api/findings/two-ended?traceA=${b.id}&eventA=0&traceB=${a.id}&eventB=0`).expect(422);
    expect(wrong.body.error.code).toBe('not_two_ended');
    const fa = (await c.post('/api/findings', { traceId: a.id, eventIndex: 0, status: 'confirmed', kind: 'open-conductor' }).expect(201)).body;
    await c.post('/api/findings', { traceId: b.id, eventIndex: 0, status: 'confirmed', kind: 'open-conductor' }).expect(201);
    const paired = await c.get(`/api/findings/${fa.id}/two-ended`).expect(200);
    expect(paired.body.twoEnded.traceB.id).toBe(b.id);
  });
});

describe('GET /api/findings', () => {
  it('filters by site and status, and pages', async () => {
    const c = await api.as('planner');
    const all = await c.get(`/api/findings?siteId=${fx.site.id}`).expect(200);
    expect(all.body.total).toBe(4);
    const dismissed = await c.get(`/api/findings?siteId=${fx.site.id}&status=dismissed`).expect(200);
    expect(dismissed.body.items.map((f: { kind: string }) => f.kind)).toEqual(['not-a-fault']);
    const page = await c.get(`/api/findings?siteId=${fx.site.id}&pageSize=1&page=2&sort=distanceM&dir=asc`).expect(200);
    expect(page.body.items).toHaveLength(1);
    expect(page.body.total).toBe(4);
  });

  it('names on each row the repair ticket acting on the finding, and none on the others', async () => {
    const trace = await upload('A', 150);
    const tech = await api.as('technician');
    const f = (await tech.post('/api/findings', { traceId: trace.id, eventIndex: 0, status: 'confirmed', kind: 'water-ingress' }).expect(201)).body;
    const sup = await api.as('supervisor');
    const ticket = (await sup.post('/api/tickets', { findingIds: [f.id], assigneeId: api.users.technician.id }).expect(201)).body;
    const list = await (await api.as('planner')).get(`/api/findings?siteId=${fx.site.id}&status=confirmed&pageSize=100`).expect(200);
    const rows = new Map(list.body.items.map((i: { id: number; tickets: unknown }) => [i.id, i.tickets]));
    expect(rows.get(f.id)).toEqual([{ id: ticket.id, title: ticket.title, status: 'assigned' }]);
    // The first finding (100 m from A) is 50 m away: another fault, on no ticket.
    const other = list.body.items.find((i: { distanceM: number }) => Math.abs(i.distanceM - 100) < 2);
    expect(other.tickets).toEqual([]);
  });
});
