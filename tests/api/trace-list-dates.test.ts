import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startApi, type Client, type TestApi } from './support/api';

/** The traces list's upload-date range, as the Traces page's From and To fields send it. */
let api: TestApi;
let sup: Client;
beforeAll(async () => {
  api = await startApi();
  sup = await api.as('supervisor');
});
afterAll(() => api.close());

describe('GET /api/traces?from=…&to=…', () => {
  it('refuses a range that ends before it starts, naming "to", rather than answering an empty list', async () => {
    const res = await sup.get('/api/traces?from=2026-12-03&to=2026-12-01').expect(400);
    expect(res.body.error.fields).toEqual([{ field: 'to', message: 'must be the same day as "from" or later' }]);
  });

  it('takes a range of one day, and either end alone', async () => {
    for (const query of ['from=2026-12-01&to=2026-12-01', 'from=2026-12-01', 'to=2026-12-01']) {
      const res = await sup.get(`/api/traces?${query}`).expect(200);
      expect(Array.isArray(res.body.items)).toBe(true);
      expect(res.body.page).toBe(1);
    }
  });

  it('still names a date that is not a day of the calendar', async () => {
    const res = await sup.get('/api/traces?from=2026-02-30').expect(400);
    expect(res.body.error.fields).toEqual([{ field: 'from', message: 'must be a date, YYYY-MM-DD' }]);
  });
});
