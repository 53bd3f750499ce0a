import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startApi, type Client, type TestApi } from './support/api';

/**
 * A list read with a parameter it does not take is refused, naming the parameter: `?q=…` on the tickets list or
 * a misspelt `?sitId=3` used to be dropped without a word and the whole list came back, read as if it were the
 * filtered one.
 */
let api: TestApi;
let admin: Client;
beforeAll(async () => {
  api = await startApi();
  admin = await api.as('admin');
});
afterAll(() => api.close());

const lists = [
  '/api/tickets',
  '/api/sites',
  '/api/cable-runs',
  '/api/cables',
  '/api/calibrations',
  '/api/calibrations/mine',
  '/api/traces',
  '/api/traces/archived',
  '/api/findings',
  '/api/users',
  '/api/outbox',
  '/api/outbox/queue',
];

describe('a list read with a parameter it does not take', () => {
  it.each(lists)('%s refuses it with 400, naming it', async (path) => {
    const res = await admin.get(`${path}?sitId=3&page=1`).expect(400);
    expect(res.body.error.code).toBe('invalid_input');
    expect(res.body.error.fields).toEqual([{ field: 'sitId', message: 'is not expected here' }]);
  });

  it('names each one, and the tickets list takes no search text', async () => {
    const res = await admin.get('/api/tickets?q=kerb&colour=red').expect(400);
    expect(res.body.error.fields).toEqual([
      { field: 'q', message: 'is not expected here' },
      { field: 'colour', message: 'is not expected here' },
    ]);
    expect(res.body.error.message).toBe('The input is not valid: q: is not expected here; colour: is not expected here');
  });

  it.each(lists)('%s still answers the parameters it takes', async (path) => {
    await admin.get(`${path}?page=1`).expect(200);
  });
});
