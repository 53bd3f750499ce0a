import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startApi, type Client, type TestApi } from './support/api';

/**
 * A misspelt query parameter on a trace view or the two-ended location was ignored, so the reader got the
 * default (2000 points, no comparison) without being told; every list's query already refused one.
 */
let api: TestApi;
let tech: Client;
beforeAll(async () => {
  api = await startApi();
  tech = await api.as('technician');
});
afterAll(() => api.close());

describe('query parameters a view does not take', () => {
  it('are refused on a trace view, naming each one, before the trace is looked for', async () => {
    const res = await tech.get('/api/traces/999999?point=100&compare_to=3').expect(400);
    expect(res.body.error.fields).toEqual([
      { field: 'point', message: 'is not expected here' },
      { field: 'compare_to', message: 'is not expected here' },
    ]);
    // Spelt right, the same request reaches the lookup.
    const missing = await tech.get('/api/traces/999999?points=100&compareTo=3').expect(404);
    expect(missing.body.error.code).toBe('not_found');
  });

  it('are refused on the two-ended location, naming the parameter', async () => {
    const res = await tech.get('/api/findings/two-ended?traceA=1&eventA=0&traceB=2&eventB=0&vf=0.66').expect(400);
    expect(res.body.error.fields).toEqual([{ field: 'vf', message: 'is not expected here' }]);
  });
});
