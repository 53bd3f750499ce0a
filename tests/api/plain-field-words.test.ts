import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startApi, type Client, type TestApi } from './support/api';

/** A refused field is said in the product's words everywhere, not in the validation library's stock English. */
let api: TestApi;
let sup: Client;
beforeAll(async () => {
  api = await startApi();
  sup = await api.as('supervisor');
});
afterAll(() => api.close());

describe('refused query fields', () => {
  it('say a text limit in characters', async () => {
    const res = await sup.get(`/api/sites?q=${'x'.repeat(101)}`).expect(400);
    expect(res.body.error.fields).toEqual([{ field: 'q', message: 'must be at most 100 characters' }]);
  });

  it('name the choices of a list filter', async () => {
    const res = await sup.get('/api/traces?status=bogus&end=C').expect(400);
    expect(res.body.error.fields).toEqual([
      { field: 'end', message: 'must be one of: A, B' },
      { field: 'status', message: 'must be one of: ok, failed, pending' },
    ]);
  });
});
