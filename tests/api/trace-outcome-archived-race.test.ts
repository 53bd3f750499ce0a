import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { CableCalibration, Trace, TraceOutcome } from '../../server/db/models';
import { makeRun, uploadStepTrace } from './support/field-fixtures';
import { startApi, type Client, type TestApi } from './support/api';

// The far end of a healthy cable, or a calibration, recorded from a trace that someone archived as junk
// while the request was on its way: the trace was read (not archived) before the recording transaction,
// and nothing looked again inside it.

let api: TestApi;
let runId: number;
let tech: Client;

beforeAll(async () => {
  api = await startApi();
  runId = (await makeRun('Archived meanwhile')).run.id;
  tech = await api.as('technician');
});
afterAll(() => api.close());

const upload = (faultM: number) => uploadStepTrace(tech, runId, faultM);

/** Archive the trace right after the request's first read of it, as a second person's archive would land. */
async function archivedAfterFirstRead<T>(traceId: number, request: () => Promise<T>): Promise<T> {
  let armed = true;
  Trace.addHook('afterFind', 'archived-meanwhile', async (found) => {
    const rows = Array.isArray(found) ? found : [found];
    if (!armed || !rows.some((r) => r && (r as Trace).id === traceId)) return;
    armed = false;
    await Trace.update({ archivedAt: new Date() }, { where: { id: traceId }, hooks: false });
  });
  try {
    return await request();
  } finally {
    Trace.removeHook('afterFind', 'archived-meanwhile');
  }
}

describe('recording from a trace archived meanwhile', () => {
  it('records no far end of a healthy cable', async () => {
    const t = await upload(160);
    const res = await archivedAfterFirstRead(t.id, () => tech.post(`/api/traces/${t.id}/healthy`, { eventIndex: t.far.index }));
    expect(res.status).toBe(422);
    expect(res.body.error).toMatchObject({
      code: 'trace_archived',
      message: `Trace ${t.id} is archived: an administrator restores it before anything is recorded from it.`,
    });
    expect(await TraceOutcome.count({ where: { traceId: t.id } })).toBe(0);
  });

  it('files no calibration', async () => {
    const t = await upload(150);
    const res = await archivedAfterFirstRead(t.id, () =>
      tech.post(`/api/traces/${t.id}/calibration`, { eventIndex: t.far.index, knownLengthM: 150 }),
    );
    expect(res.status).toBe(422);
    expect(res.body.error.code).toBe('trace_archived');
    expect(await TraceOutcome.count({ where: { traceId: t.id } })).toBe(0);
    expect(await CableCalibration.count({ where: { traceId: t.id } })).toBe(0);
  });
});
