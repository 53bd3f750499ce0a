import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Trace } from '../../server/db/models';
import { makeRun, uploadStepTrace } from './support/field-fixtures';
import { startApi, type Client, type TestApi } from './support/api';

// A trace whose far end was recorded as the run's measured length, or from which a field calibration
// was filed, is part of that record as a trace with a finding is: archiving it as junk would leave the
// run's length or the calibration resting on a trace the lists no longer show.

let api: TestApi;
let runId: number;
let tech: Client;

beforeAll(async () => {
  api = await startApi();
  runId = (await makeRun('Archive outcomes')).run.id;
  tech = await api.as('technician');
});
afterAll(() => api.close());

const upload = (faultM: number) => uploadStepTrace(tech, runId, faultM);

describe('archiving a trace something was recorded from', () => {
  it('is refused once its far end is recorded as the measured length, and the trace stays listed', async () => {
    const t = await upload(180);
    await tech.post(`/api/traces/${t.id}/healthy`, { eventIndex: t.far.index }).expect(201);
    const res = await tech.post(`/api/traces/${t.id}/archive`, { reason: 'Looks like junk' }).expect(409);
    expect(res.body.error.code).toBe('has_outcomes');
    expect(res.body.error.message).toBe(
      `Trace ${t.id} holds a recorded outcome (far end of a healthy cable), so it stays in the lists as part of that record.`,
    );
    expect((await Trace.findByPk(t.id))!.archivedAt).toBeNull();
  });

  it('is refused once a field calibration was filed from it', async () => {
    const t = await upload(170);
    await tech.post(`/api/traces/${t.id}/calibration`, { eventIndex: t.far.index, knownLengthM: 170 }).expect(201);
    const res = await tech.post(`/api/traces/${t.id}/archive`, { reason: 'Looks like junk' }).expect(409);
    expect(res.body.error.message).toBe(
      `Trace ${t.id} holds a recorded outcome (field calibration filed), so it stays in the lists as part of that record.`,
    );
  });
});
