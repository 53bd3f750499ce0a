import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { CableType, Site } from '../../server/db/models';
import { startApi, type Client, type TestApi } from './support/api';
import { solidPeCoax } from './support/cables';

// Two sites (or cable types) may not share a name as a reader sees it. A zero-width space (U+200B), a word joiner
// (U+2060) or a soft hyphen (U+00AD) draws nothing, yet each made a second "Harbour pumping station" that looked
// the same as the first in every list, picker and e-mail: technicians then filed traces against the wrong one.

let api: TestApi;
let sup: Client;
beforeAll(async () => {
  api = await startApi();
  sup = await api.as('supervisor');
});
afterAll(() => api.close());

describe('names that differ only by characters that draw nothing', () => {
  it('are taken as the same site name, and a name of nothing but them is refused', async () => {
    await sup.post('/api/sites', { name: 'Harbour pumping station' }).expect(201);
    for (const name of ['Harbour\u200b pumping station', 'Harbour pumping station\u2060', 'Harbour pump\u00ading station', 'Harbour pumping\u200d station']) {
      const res = await sup.post('/api/sites', { name });
      expect(res.status, JSON.stringify(name)).toBe(409);
      expect(res.body.error.code).toBe('site_name_taken');
    }
    expect(await Site.count({ where: { nameKey: 'harbour pumping station' } })).toBe(1);

    const blank = await sup.post('/api/sites', { name: '\u200b\u2060' });
    expect(blank.status).toBe(400);
    expect(blank.body.error.fields).toEqual([{ field: 'name', message: 'must have a visible character: it holds only characters that draw nothing (such as U+200B)' }]);
  });

  it('are taken as the same cable type name', async () => {
    const planner = await api.as('planner');
    await planner.post('/api/cables', solidPeCoax('Yard coax 50')).expect(201);
    const twin = await planner.post('/api/cables', solidPeCoax('Yard\u200b coax 50'));
    expect(twin.status).toBe(409);
    expect(await CableType.count({ where: { nameKey: 'yard coax 50' } })).toBe(1);
  });
});
