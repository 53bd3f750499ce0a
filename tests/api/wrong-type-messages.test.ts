import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startApi, type Client, type TestApi } from './support/api';

/**
 * A field that must be given is told "is required" only when it is missing. Sent as something else (a number
 * where text is wanted, text where a number is wanted, a word that is not one of the choices), it is told what it
 * must be: {"comment": 7} used to come back "comment: is required", which sends the reader looking for a field
 * that is there. The bodies are refused before any row is looked for, so the ids need not exist.
 */
let api: TestApi;
let sup: Client;
beforeAll(async () => {
  api = await startApi();
  sup = await api.as('supervisor');
});
afterAll(() => api.close());

async function fieldsOf(path: string, body: object) {
  const res = await sup.post(path, body).expect(400);
  expect(res.body.error.code).toBe('invalid_input');
  return res.body.error.fields as Array<{ field: string; message: string }>;
}

describe('a field sent with the wrong type', () => {
  it('is told it must be text, a number or one of the choices', async () => {
    expect(await fieldsOf('/api/tickets/999999/comments', { comment: 7 })).toEqual([{ field: 'comment', message: 'must be text' }]);
    expect(await fieldsOf('/api/tickets/999999/comments', { comment: ['ok'] })).toEqual([{ field: 'comment', message: 'must be text' }]);
    expect(await fieldsOf('/api/measurements/999999/withdraw', { reason: true })).toEqual([{ field: 'reason', message: 'must be text' }]);
    expect(await fieldsOf('/api/calibrations', { cableTypeId: '4', knownLengthM: '100', roundTripNs: 1000 })).toEqual([
      { field: 'cableTypeId', message: 'must be a number' },
      { field: 'knownLengthM', message: 'must be a number' },
    ]);
    expect(await fieldsOf('/api/findings/999999/reverse', { to: 'maybe', reason: 'Crew saw water in the splice' })).toEqual([
      { field: 'to', message: 'must be one of confirmed, dismissed' },
    ]);
  });

  it('is still told it is required when it is missing', async () => {
    expect(await fieldsOf('/api/tickets/999999/comments', {})).toEqual([{ field: 'comment', message: 'is required' }]);
    expect(await fieldsOf('/api/tickets/999999/comments', { comment: null })).toEqual([{ field: 'comment', message: 'is required' }]);
    expect(await fieldsOf('/api/measurements/999999/withdraw', {})).toEqual([{ field: 'reason', message: 'is required: why it is withdrawn' }]);
    expect(await fieldsOf('/api/calibrations', { roundTripNs: 1000 })).toEqual([
      { field: 'cableTypeId', message: 'is required' },
      { field: 'knownLengthM', message: 'is required: a number of metres' },
    ]);
  });
});
