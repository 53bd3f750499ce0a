import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Trace } from '../../server/db/models';
import { analyseBytes } from '../../server/traces/analysis';
import { compareWithServer, summariseDeviceAnalysis } from '../../shared/offline/device-summary';
import type { DeviceAnalysis } from '../../shared/schemas/device-analysis';
import { makeRun, stepTraceCsv } from './support/field-fixtures';
import { startApi, type Client, type TestApi } from './support/api';

/** What a phone holding the library value `vf` makes of the file, as it sends it. */
function phoneSummary(csv: Buffer, vf: number): DeviceAnalysis {
  const { outcome } = analyseBytes(csv, { mode: 'auto' }, { vf, vfTolerance: 0.02, z0Ohm: 50 }, 10_000_000);
  return summariseDeviceAnalysis(outcome.analysis!, { analysedAt: new Date('2031-05-14T08:30:00Z'), cableTypeRevision: 1 });
}

describe('POST /api/traces with the phone’s own analysis', () => {
  let api: TestApi;
  let tech: Client;
  let runId: number;
  let cableId: number;
  beforeAll(async () => {
    api = await startApi();
    tech = await api.as('technician');
    const made = await makeRun('Offline run');
    runId = made.run.id;
    cableId = made.cable.id;
  });
  afterAll(() => api?.close());

  const send = (csv: Buffer, name: string, deviceAnalysis: string, key?: string) => {
    const req = tech
      .postRaw('/api/traces')
      .field('cableRunId', String(runId))
      .field('end', 'A')
      .field('deviceAnalysis', deviceAnalysis)
      .attach('file', csv, name);
    return key ? req.set('Idempotency-Key', key) : req;
  };

  it('keeps the summary with the trace and finds it equal to the server’s analysis when nothing changed', async () => {
    const csv = Buffer.from(stepTraceCsv({ faultM: 120, vf: 0.66 }));
    const summary = phoneSummary(csv, 0.66);
    const res = await send(csv, 'same.csv', JSON.stringify(summary), 'device-same-0001').expect(201);
    const trace = res.body.traces[0];
    expect(trace.deviceAnalysis).toEqual(summary);
    const stored = await Trace.findByPk(trace.id);
    expect(stored!.deviceAnalysis).toEqual(summary);
    // The file was written with an open at 120 m; both sides read it there.
    expect(Math.abs(summary.events[0].distanceM - 120)).toBeLessThan(1);
    expect(compareWithServer(trace.deviceAnalysis, trace.analysis).same).toBe(true);
  });

  it('shows the difference when the library’s VF changed while the phone was offline', async () => {
    const csv = Buffer.from(stepTraceCsv({ faultM: 150, vf: 0.66 }));
    const summary = phoneSummary(csv, 0.66);
    const planner = await api.as('planner');
    await planner.patch(`/api/cables/${cableId}`, { vf: 0.7, reason: 'Field calibration on the offline run' }).expect(200);
    const res = await send(csv, 'changed.csv', JSON.stringify(summary), 'device-changed-0001').expect(201);
    const trace = res.body.traces[0];
    const diff = compareWithServer(trace.deviceAnalysis, trace.analysis);
    expect(diff.same).toBe(false);
    expect(diff.vf).toEqual({ device: 0.66, server: 0.7 });
    // d = VF·c·t/2: the same round trip read with VF 0.70 instead of 0.66 is 0.70/0.66 as far.
    const moved = diff.events[0];
    expect(moved.server!.distanceM / moved.device!.distanceM).toBeCloseTo(0.7 / 0.66, 3);
  });

  it('stores one trace when the same upload with its summary is sent twice under one key', async () => {
    const csv = Buffer.from(stepTraceCsv({ faultM: 90, vf: 0.66 }));
    const summary = JSON.stringify(phoneSummary(csv, 0.7));
    const before = await Trace.count();
    const first = await send(csv, 'twice.csv', summary, 'device-twice-0001').expect(201);
    const again = await send(csv, 'twice.csv', summary, 'device-twice-0001').expect(201);
    expect(again.body.replayed).toBe(true);
    expect(again.body.traces[0].id).toBe(first.body.traces[0].id);
    expect(await Trace.count()).toBe(before + 1);
  });

  it('refuses a summary that is not JSON, or out of range, naming the field, and stores nothing', async () => {
    const csv = Buffer.from(stepTraceCsv({ faultM: 60, vf: 0.66 }));
    const before = await Trace.count();
    const notJson = await send(csv, 'bad.csv', '{"engineVersion": "1.0.0",').expect(400);
    expect(notJson.body.error.code).toBe('invalid_input');
    expect(notJson.body.error.fields).toEqual([
      { field: 'deviceAnalysis', message: 'must be JSON text (the analysis made on the device)' },
    ]);
    const fast = { ...phoneSummary(csv, 0.66), vf: 1.4 };
    const tooFast = await send(csv, 'bad.csv', JSON.stringify(fast)).expect(400);
    expect(tooFast.body.error.fields).toEqual([{ field: 'deviceAnalysis.vf', message: 'must be at most 1' }]);
    const extra = await send(csv, 'bad.csv', JSON.stringify({ ...phoneSummary(csv, 0.66), samples: [1, 2] })).expect(400);
    expect(extra.body.error.fields).toEqual([{ field: 'deviceAnalysis.samples', message: 'is not expected here' }]);
    expect(await Trace.count()).toBe(before);
  });

  it('refuses a NUL, half a surrogate pair or a direction control written as a JSON escape in the summary, naming the field, and stores nothing', async () => {
    const csv = Buffer.from(stepTraceCsv({ faultM: 62, vf: 0.66 }));
    const before = await Trace.count();
    // The form field itself is plain ASCII: the characters only appear once its JSON is read.
    const withVersion = (escaped: string) => JSON.stringify({ ...phoneSummary(csv, 0.66), engineVersion: 'VERSION' }).replace('VERSION', escaped);
    const nul = await send(csv, 'esc.csv', withVersion('1.0\\u0000')).expect(400);
    expect(nul.body.error.code).toBe('nul_byte');
    expect(nul.body.error.fields[0].field).toBe('deviceAnalysis.engineVersion');
    const half = await send(csv, 'esc.csv', withVersion('1.0\\ud800')).expect(400);
    expect(half.body.error.code).toBe('broken_text');
    expect(half.body.error.fields[0].field).toBe('deviceAnalysis.engineVersion');
    const bidi = await send(csv, 'esc.csv', withVersion('\\u202e0.1')).expect(400);
    expect(bidi.body.error.code).toBe('hidden_direction_mark');
    expect(bidi.body.error.fields[0].field).toBe('deviceAnalysis.engineVersion');
    expect(await Trace.count()).toBe(before);
  });

  it('refuses a direction control in the VF override reason, naming the field', async () => {
    const csv = Buffer.from(stepTraceCsv({ faultM: 64, vf: 0.66 }));
    const before = await Trace.count();
    const res = await tech
      .postRaw('/api/traces')
      .field('cableRunId', String(runId))
      .field('end', 'A')
      .field('vfOverride', '0.7')
      .field('vfOverrideReason', 'datasheet \u202Eevoba')
      .attach('file', csv, 'override.csv')
      .expect(400);
    expect(res.body.error.code).toBe('hidden_direction_mark');
    expect(res.body.error.fields[0].field).toBe('vfOverrideReason');
    expect(await Trace.count()).toBe(before);
  });

  it('leaves deviceAnalysis empty on a trace uploaded from the desk', async () => {
    const csv = Buffer.from(stepTraceCsv({ faultM: 65, vf: 0.66 }));
    const res = await tech
      .postRaw('/api/traces')
      .field('cableRunId', String(runId))
      .field('end', 'B')
      .attach('file', csv, 'desk.csv')
      .expect(201);
    expect(res.body.traces[0].deviceAnalysis).toBeNull();
  });
});
