import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeRun, stepTraceCsv } from './support/field-fixtures';
import { startApi, type TestApi } from './support/api';

let api: TestApi;
let feeder: Awaited<ReturnType<typeof makeRun>>;
let pair: Awaited<ReturnType<typeof makeRun>>;
const found: Record<string, number> = {};

async function confirmOn(run: { id: number }, name: string) {
  const tech = await api.as('technician');
  const up = await tech
    .postRaw('/api/traces')
    .field('cableRunId', String(run.id))
    .field('end', 'A')
    .attach('file', Buffer.from(stepTraceCsv({ faultM: 70, vf: 0.66 })), `${name}.csv`)
    .expect(201);
  const f = await tech.post('/api/findings', { traceId: up.body.traces[0].id, eventIndex: 0, status: 'confirmed', kind: 'open-conductor', note: 'kerb side' }).expect(201);
  found[name] = f.body.id as number;
}

async function search(text: string): Promise<number[]> {
  const c = await api.as('technician');
  const res = await c.get(`/api/findings?q=${encodeURIComponent(text)}&pageSize=100`).expect(200);
  return (res.body.items as Array<{ id: number }>).map((f) => f.id).sort((a, b) => a - b);
}

beforeAll(async () => {
  api = await startApi();
  feeder = await makeRun('Feeder QX-3 to Mill Lane');
  pair = await makeRun('Control pair QX-C2');
  await confirmOn(feeder.run, 'feeder');
  await confirmOn(pair.run, 'pair');
});
afterAll(() => api.close());

describe('finding search by site and cable run name', () => {
  it("finds a run's findings by a part of its name, in any letter case, and no other run's", async () => {
    expect(await search('QX-3')).toEqual([found.feeder]);
    expect(await search('qx-c2')).toEqual([found.pair]);
    expect(await search('QX')).toEqual([found.feeder!, found.pair!].sort((a, b) => a - b));
  });

  it("finds a site's findings by its name", async () => {
    expect(await search(pair.site.name)).toEqual([found.pair]);
    expect(await search(feeder.site.name.toUpperCase())).toEqual([found.feeder]);
  });

  it('still finds by note and narrows by name together with the other filters', async () => {
    expect(await search('kerb side')).toEqual([found.feeder!, found.pair!].sort((a, b) => a - b));
    const c = await api.as('technician');
    const res = await c.get(`/api/findings?q=QX&cableRunId=${pair.run.id}`).expect(200);
    expect(res.body.items.map((f: { id: number }) => f.id)).toEqual([found.pair]);
    expect(await search('QX-9')).toEqual([]);
  });
});
