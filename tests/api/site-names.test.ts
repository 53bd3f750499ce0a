import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startApi, type Client, type TestApi } from './support/api';

// Two sites whose names a reader cannot tell apart are one place twice: findings, tickets and
// e-mails would name either. Case folding and Unicode normalisation are from the Unicode
// standard (NFC/NFD of "É": U+00C9 = U+0045 U+0301; "É" lower-cases to "é").

let api: TestApi;
let planner: Client;

beforeAll(async () => {
  api = await startApi();
  planner = await api.as('planner');
});
afterAll(() => api.close());

const create = (name: string) => planner.post('/api/sites', { name, supervisorIds: [] });

async function sitesNamed(word: string): Promise<string[]> {
  const res = await planner.get(`/api/sites?q=${encodeURIComponent(word)}&pageSize=100`).expect(200);
  return (res.body.items as { name: string }[]).map((s) => s.name);
}

describe('site names are unique as a reader sees them', () => {
  it('refuses the same name again in another case, ASCII or not', async () => {
    await create('North Yard').expect(201);
    const ascii = await create('north yard').expect(409);
    expect(ascii.body.error.code).toBe('site_name_taken');
    expect(ascii.body.error.fields).toEqual([{ field: 'name', message: 'is already used by another site' }]);

    await create('Écluse Basse').expect(201);
    const same = await create('Écluse Basse').expect(409);
    expect(same.body.error.code).toBe('site_name_taken');
    const lower = await create('écluse basse').expect(409);
    expect(lower.body.error.code).toBe('site_name_taken');
    expect(lower.body.error.message).toBe('There is already a site called "écluse basse" (as "Écluse Basse").');
    expect(await sitesNamed('Basse')).toEqual(['Écluse Basse']);
  });

  it('refuses a name that differs only in Unicode form or in runs of spaces', async () => {
    await create('Ωmega Pumping Station').expect(201);
    expect((await create('ωmega pumping station').expect(409)).body.error.code).toBe('site_name_taken');
    await create('Caf\u00e9 Corner').expect(201);
    expect((await create('Cafe\u0301 Corner').expect(409)).body.error.code).toBe('site_name_taken');
    expect((await create('Café   Corner').expect(409)).body.error.code).toBe('site_name_taken');
    expect(await sitesNamed('Corner')).toEqual(['Café Corner']);
  });

  it('refuses renaming a site to another one\'s name, and keeps a site\'s own name on an edit', async () => {
    const a = (await create('Åsgard Depot').expect(201)).body;
    const b = (await create('Brook Depot').expect(201)).body;
    const clash = await planner.put(`/api/sites/${b.id}`, { name: 'åsgard depot', supervisorIds: [] }).expect(409);
    expect(clash.body.error.code).toBe('site_name_taken');
    expect((await planner.get(`/api/sites/${b.id}`).expect(200)).body.name).toBe('Brook Depot');
    const own = await planner.put(`/api/sites/${a.id}`, { name: 'ÅSGARD DEPOT', address: 'Quay 4', supervisorIds: [] }).expect(200);
    expect(own.body.name).toBe('ÅSGARD DEPOT');
    expect(own.body.address).toBe('Quay 4');
  });
});
