import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startApi, type Client, type TestApi } from './support/api';
import { makeRun } from './support/field-fixtures';

// Two runs at one site whose names a reader cannot tell apart would be picked for each other when a
// trace is uploaded. Case folding and normalisation from the Unicode standard ("Ø" lower-cases to "ø";
// "é" is U+00E9 or U+0065 U+0301).

let api: TestApi;
let sup: Client;
let fx: Awaited<ReturnType<typeof makeRun>>;

beforeAll(async () => {
  api = await startApi();
  sup = await api.as('supervisor');
  fx = await makeRun('Feeder Ø1');
});
afterAll(() => api.close());

const body = (name: string, siteId = fx.site.id) => ({ siteId, name, cableTypeId: fx.cable.id, endALabel: 'Cabinet C-1', endBLabel: 'Pole 14', installedLengthM: 150 });

async function runNames(siteId: number) {
  const res = await sup.get(`/api/cable-runs?siteId=${siteId}`).expect(200);
  return ((res.body.items ?? res.body) as { name: string }[]).map((r) => r.name).sort();
}

describe('cable run names at a site', () => {
  it('refuses a second run whose name differs only in case, Unicode form or spaces', async () => {
    for (const name of ['feeder ø1', 'FEEDER Ø1', 'Feeder  Ø1']) {
      const res = await sup.post('/api/cable-runs', body(name)).expect(422);
      expect(res.body.error.code).toBe('invalid_cable_run');
      expect(res.body.error.fields).toEqual([{ field: 'name', message: 'is already used by another run at this site (as "Feeder Ø1")' }]);
    }
    await sup.post('/api/cable-runs', body('Quai d\u00e9part')).expect(201);
    const nfd = await sup.post('/api/cable-runs', body('Quai de\u0301part')).expect(422);
    expect(nfd.body.error.fields[0].field).toBe('name');
    expect(await runNames(fx.site.id)).toEqual(['Feeder Ø1', 'Quai départ']);
  });

  it('refuses a rename onto another run\'s name, keeps a run\'s own name in another case, and allows the name at another site', async () => {
    const second = (await sup.post('/api/cable-runs', body('Spur 2')).expect(201)).body;
    const clash = await sup.put(`/api/cable-runs/${second.id}`, { ...body('quai DÉPART'), siteId: undefined }).expect(422);
    expect(clash.body.error.fields).toEqual([{ field: 'name', message: 'is already used by another run at this site (as "Quai départ")' }]);
    const own = await sup.put(`/api/cable-runs/${second.id}`, { ...body('SPUR 2'), siteId: undefined }).expect(200);
    expect(own.body.name).toBe('SPUR 2');
    const other = await makeRun('Elsewhere');
    await sup.post('/api/cable-runs', body('feeder ø1', other.site.id)).expect(201);
  });
});
