import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeRun, stepTraceCsv } from './support/field-fixtures';
import { startApi, type TestApi } from './support/api';

let api: TestApi;
let fx: Awaited<ReturnType<typeof makeRun>>;
const traceIds: Record<string, number> = {};

async function upload(name: string, faultM: number) {
  const c = await api.as('technician');
  const res = await c
    .postRaw('/api/traces')
    .field('cableRunId', String(fx.run.id))
    .field('end', 'A')
    .attach('file', Buffer.from(stepTraceCsv({ faultM, vf: 0.66 })), name)
    .expect(201);
  traceIds[name] = res.body.traces[0].id;
  return res.body.traces[0].id as number;
}

beforeAll(async () => {
  api = await startApi();
  fx = await makeRun('Search run');
  await upload('Riverside-A.csv', 60);
  await upload('riverside-b.csv', 90);
  await upload('kerb_100%.csv', 120);
  await upload('kerbX100.csv', 150);
  const tech = await api.as('technician');
  await tech.post('/api/findings', { traceId: traceIds['Riverside-A.csv'], eventIndex: 0, status: 'confirmed', kind: 'open-conductor', note: 'Under the HEDGE by the stile' }).expect(201);
  await tech.post('/api/findings', { traceId: traceIds['riverside-b.csv'], eventIndex: 0, status: 'confirmed', kind: 'open-conductor', note: 'dig by the kerb' }).expect(201);
  await tech.post('/api/findings', { traceId: traceIds['kerb_100%.csv'], eventIndex: 0, status: 'dismissed', kind: 'not-a-fault', note: 'hedge root, not a fault' }).expect(201);
});
afterAll(() => api.close());

describe('text search in the lists', () => {
  it('finds traces by file name, case-insensitively, within the other filters', async () => {
    const c = await api.as('technician');
    const res = await c.get(`/api/traces?cableRunId=${fx.run.id}&q=RIVERSIDE&sort=originalName&dir=asc`).expect(200);
    expect(res.body.total).toBe(2);
    expect(res.body.items.map((t: { originalName: string }) => t.originalName)).toEqual(['Riverside-A.csv', 'riverside-b.csv']);
    const none = await c.get(`/api/traces?cableRunId=${fx.run.id}&q=pumphouse`).expect(200);
    expect(none.body.total).toBe(0);
    expect(none.body.items).toEqual([]);
  });

  it('takes % and _ in the search text literally', async () => {
    const c = await api.as('technician');
    const pct = await c.get(`/api/traces?cableRunId=${fx.run.id}&q=${encodeURIComponent('100%')}`).expect(200);
    expect(pct.body.items.map((t: { originalName: string }) => t.originalName)).toEqual(['kerb_100%.csv']);
    const under = await c.get(`/api/traces?cableRunId=${fx.run.id}&q=${encodeURIComponent('b_1')}`).expect(200);
    expect(under.body.items.map((t: { originalName: string }) => t.originalName)).toEqual(['kerb_100%.csv']);
  });

  it('finds findings by note, with the status filter and the count of matches', async () => {
    const c = await api.as('technician');
    const all = await c.get(`/api/findings?cableRunId=${fx.run.id}&q=hedge`).expect(200);
    expect(all.body.total).toBe(2);
    const confirmed = await c.get(`/api/findings?cableRunId=${fx.run.id}&q=hedge&status=confirmed`).expect(200);
    expect(confirmed.body.total).toBe(1);
    expect(confirmed.body.items[0].note).toBe('Under the HEDGE by the stile');
    const kind = await c.get(`/api/findings?cableRunId=${fx.run.id}&q=not-a-fault`).expect(200);
    expect(kind.body.total).toBe(1);
    expect(kind.body.items[0].status).toBe('dismissed');
  });

  it('refuses an over-long search text, naming the field', async () => {
    const c = await api.as('technician');
    const res = await c.get(`/api/traces?q=${'x'.repeat(101)}`).expect(400);
    expect(JSON.stringify(res.body)).toMatch(/\bq\b/);
  });
});

describe('site counts', () => {
  it('counts the cable runs and the confirmed findings of each site', async () => {
    const c = await api.as('technician');
    const res = await c.get(`/api/sites/${fx.site.id}`).expect(200);
    // One run; two confirmed findings and one dismissed (not counted).
    expect(res.body.cableRunCount).toBe(1);
    expect(res.body.openFindingCount).toBe(2);
    const list = await c.get(`/api/sites?q=${encodeURIComponent(fx.site.name)}`).expect(200);
    expect(list.body.items).toHaveLength(1);
    expect(list.body.items[0].cableRunCount).toBe(1);
    expect(list.body.items[0].openFindingCount).toBe(2);
  });

  it('takes % and _ in a search of sites, runs, users and cables as letters, not wildcards', async () => {
    const c = await api.as('admin');
    for (const url of ['/api/sites', '/api/cable-runs', '/api/users', '/api/cables']) {
      const all = await c.get(url).expect(200);
      expect(all.body.items.length).toBeGreaterThan(0);
      for (const q of ['%%%', '_', '%']) {
        const res = await c.get(`${url}?q=${encodeURIComponent(q)}`).expect(200);
        expect({ url, q, total: res.body.total }).toEqual({ url, q, total: 0 });
      }
    }
    // Letters still match in any ASCII case.
    const list = await c.get(`/api/sites?q=${encodeURIComponent(fx.site.name.toUpperCase())}`).expect(200);
    expect(list.body.items.map((s: { id: number }) => s.id)).toContain(fx.site.id);
  });
});
