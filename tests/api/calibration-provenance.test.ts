import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { CableCalibration } from '../../server/db/models';
import { startApi, type Client, type TestApi } from './support/api';
import { makeRun, uploadStepTrace } from './support/field-fixtures';

// A calibration says where it came from: typed in by hand, read off a trace, or the position a repair crew found.
// The planner reviewing it weighs it by that. Filed through POST /api/calibrations, it could claim to be a repair
// close-out without one, and say it was read off a trace without naming it.

let api: TestApi;
let tech: Client;
let traceId: number;
let cableId: number;

const C = 299_792_458; // m/s, exact (SI definition of the metre)
const roundTripNs = (lengthM: number, vf: number) => ((2 * lengthM) / (vf * C)) * 1e9;

beforeAll(async () => {
  api = await startApi();
  tech = await api.as('technician');
  const fx = await makeRun('Provenance run');
  cableId = fx.cable.id;
  traceId = (await uploadStepTrace(tech, fx.run.id, 150)).id;
});
afterAll(() => api.close());

describe('a calibration filed by hand', () => {
  it('cannot say it came from a repair close-out (only a close-out files those)', async () => {
    const before = await CableCalibration.count();
    const res = await tech.post('/api/calibrations', { cableTypeId: cableId, knownLengthM: 150, roundTripNs: roundTripNs(150, 0.65), source: 'repair-closeout', traceId }).expect(400);
    expect(res.body.error.fields[0]).toMatchObject({ field: 'source' });
    expect(await CableCalibration.count()).toBe(before);
  });

  it('said to be read off a trace, names the trace', async () => {
    const before = await CableCalibration.count();
    const none = await tech.post('/api/calibrations', { cableTypeId: cableId, knownLengthM: 150, roundTripNs: roundTripNs(150, 0.65), source: 'trace' }).expect(400);
    expect(none.body.error.fields[0]).toMatchObject({ field: 'traceId' });
    expect(await CableCalibration.count()).toBe(before);
    const ok = await tech.post('/api/calibrations', { cableTypeId: cableId, knownLengthM: 150, roundTripNs: roundTripNs(150, 0.65), source: 'trace', traceId }).expect(201);
    // Filed by hand, no repair ticket stands behind it.
    expect(ok.body).toMatchObject({ source: 'trace', traceId, ticketId: null });
  });
});

