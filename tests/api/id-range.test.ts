import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { CableCalibration } from '../../server/db/models';
import { makeRun } from './support/field-fixtures';
import { startApi, type Client, type TestApi } from './support/api';

/**
 * Ids are integer columns (at most 2^31 − 1 = 2147483647 on PostgreSQL). A larger id in a path, a query or a JSON
 * body names no row; PostgreSQL refused it as a bound value ("out of range for type integer") and
 * POST /api/outbox/queue/99999999999/retry answered 500 there, while SQLite answered 404. It is refused as input,
 * naming the field, on both.
 */
let api: TestApi;
let admin: Client;
let planner: Client;
let fx: Awaited<ReturnType<typeof makeRun>>;

beforeAll(async () => {
  api = await startApi();
  admin = await api.as('admin');
  planner = await api.as('planner');
  fx = await makeRun('Id range run');
});
afterAll(() => api.close());

describe('an id past the largest a row can have', () => {
  it('in a path is refused naming it; the largest one is read as not found', async () => {
    for (const url of ['/api/outbox/queue/99999999999/retry', '/api/outbox/queue/2147483648/retry']) {
      const res = await admin.post(url).expect(400);
      expect(res.body.error.fields, url).toEqual([{ field: 'id', message: 'must be at most 2147483647' }]);
    }
    const largest = await admin.post('/api/outbox/queue/2147483647/retry').expect(404);
    expect(largest.body.error.message).toBe('Mail job 2147483647 was not found.');
    const trace = await admin.get('/api/traces/99999999999').expect(400);
    expect(trace.body.error.fields).toEqual([{ field: 'id', message: 'must be at most 2147483647' }]);
  });

  it('in a query is refused naming it', async () => {
    const runs = await admin.get('/api/traces?cableRunId=2147483648').expect(400);
    expect(runs.body.error.fields).toEqual([{ field: 'cableRunId', message: 'must be at most 2147483647' }]);
    const readings = await admin.get('/api/measurements?cableRunId=9999999999').expect(400);
    expect(readings.body.error.fields).toEqual([{ field: 'cableRunId', message: 'must be a cable run id (at most 2147483647)' }]);
  });

  it('in a JSON body is refused naming it, and nothing is stored', async () => {
    const before = await CableCalibration.count();
    // A run of 100 m and a round trip of 1010 ns: VF ≈ 0.66 (2·100 m / (c · 1010 ns), c = 299792458 m/s).
    const calibration = { cableTypeId: fx.cable.id, knownLengthM: 100, roundTripNs: 1010, source: 'manual' };
    const cable = await planner.post('/api/calibrations', { ...calibration, cableTypeId: 2147483648 }).expect(400);
    expect(cable.body.error.fields).toEqual([{ field: 'cableTypeId', message: 'must be at most 2147483647' }]);
    const trace = await planner.post('/api/calibrations', { ...calibration, traceId: 99999999999 }).expect(400);
    expect(trace.body.error.fields).toEqual([{ field: 'traceId', message: 'must be a trace id (at most 2147483647)' }]);
    expect(await CableCalibration.count()).toBe(before);
    const handOver = await admin.post(`/api/users/${api.users.technician.id}/hand-over-repairs`, { toUserId: 2147483648 }).expect(400);
    expect(handOver.body.error.fields).toEqual([{ field: 'toUserId', message: 'must be a person (at most 2147483647)' }]);
  });
});
