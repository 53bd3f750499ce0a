import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { CableCalibration, Trace, TraceArchiveEvent, TraceOutcome } from '../../server/db/models';
import { makeRun, stepTraceCsv } from './support/field-fixtures';
import { startApi, type Client, type TestApi } from './support/api';

let api: TestApi;
let runId: number;
let tech: Client;

beforeAll(async () => {
  api = await startApi({ maxUploadBytes: 4_000_000 });
  runId = (await makeRun('Outcome run')).run.id;
  tech = await api.as('technician');
});
afterAll(() => api.close());

type Ev = { index: number; distanceM: number; likelyMultipleOf: number | null; roundTripNs: number; windowStartM: number; windowEndM: number };

async function upload(c: Client, csv: string | Buffer, name: string, end: 'A' | 'B' = 'A', status = 201) {
  const res = await c.postRaw('/api/traces').field('cableRunId', String(runId)).field('end', end).attach('file', Buffer.from(csv), name);
  expect(res.status, JSON.stringify(res.body)).toBe(status);
  return status === 201 ? res.body.traces[0] : res.body.error.traces[0];
}

/** The last reflection that is not an echo: on these files, the open they were written with. */
const farEnd = (t: { analysis: { events: Ev[] } }) =>
  t.analysis.events.filter((e) => e.likelyMultipleOf === null).reduce((a, b) => (b.distanceM > a.distanceM ? b : a));

describe('POST /api/traces/:id/healthy', () => {
  it('records the far end of a healthy cable as the run’s measured length, once, by its uploader', async () => {
    // The run is recorded as 200 m; the file puts its open 0.3 % further, at 200.6 m (written with VF 0.66).
    const t = await upload(tech, stepTraceCsv({ faultM: 200.6, vf: 0.66, samples: 3000 }), 'healthy-run.csv');
    const end = farEnd(t);
    expect(Math.abs(end.distanceM - 200.6)).toBeLessThan(1);

    const res = await tech.post(`/api/traces/${t.id}/healthy`, { eventIndex: end.index, note: 'Tested both ends, insulation fine' }).expect(201);
    expect(res.body.kind).toBe('far-end-healthy');
    expect(res.body.measuredLengthM).toBe(end.distanceM);
    expect(res.body.installedLengthM).toBe(200);
    expect(res.body.windowStartM).toBe(end.windowStartM);
    expect(res.body.recordedBy.name).toBe('Tess Tech');

    const rows = await TraceOutcome.findAll({ where: { traceId: t.id } });
    expect(rows.map((r) => [r.kind, r.measuredLengthM, r.cableRunId, r.note])).toEqual([['far-end-healthy', end.distanceM, runId, 'Tested both ends, insulation fine']]);

    const again = await tech.post(`/api/traces/${t.id}/healthy`, { eventIndex: end.index }).expect(409);
    expect(again.body.error.code).toBe('already_recorded');
    expect(await TraceOutcome.count({ where: { traceId: t.id } })).toBe(1);

    const view = await tech.get(`/api/traces/${t.id}/outcomes`).expect(200);
    expect(view.body.outcomes).toHaveLength(1);
    expect(view.body.archive).toEqual({ traceId: t.id, archived: false, archivedAt: null, history: [] });
  });

  it('leaves someone else’s trace to its uploader or a supervisor', async () => {
    const t = await upload(tech, stepTraceCsv({ faultM: 199.5, vf: 0.66 }), 'someone-elses.csv');
    const stranger = await api.as('admin');
    // An administrator reviews findings, so may; a second technician may not.
    const { User } = await import('../../server/db/models');
    const { hashPassword } = await import('../../server/auth/passwords');
    await User.create({ email: 'second.tech@example.com', name: 'Second Tech', role: 'technician', passwordHash: await hashPassword('correct-horse-battery') });
    const second = await api.signIn('second.tech@example.com', 'correct-horse-battery');
    const refused = await second.post(`/api/traces/${t.id}/healthy`, { eventIndex: farEnd(t).index }).expect(403);
    expect(refused.body.error.code).toBe('not_your_trace');
    expect(await TraceOutcome.count({ where: { traceId: t.id } })).toBe(0);
    await stranger.post(`/api/traces/${t.id}/healthy`, { eventIndex: farEnd(t).index }).expect(201);
  });

  it('refuses bad input with the field, an unknown event, and a trace with a confirmed fault', async () => {
    const t = await upload(tech, stepTraceCsv({ faultM: 120, vf: 0.66 }), 'fault-at-120.csv');
    const bad = await tech.post(`/api/traces/${t.id}/healthy`, { eventIndex: 'last' }).expect(400);
    expect(bad.body.error.fields.map((f: { field: string }) => f.field)).toEqual(['eventIndex']);
    const missing = await tech.post(`/api/traces/${t.id}/healthy`, { eventIndex: 99 }).expect(422);
    expect(missing.body.error.code).toBe('no_such_event');
    await tech.post(`/api/traces/999999/healthy`, { eventIndex: 0 }).expect(404);

    const open = farEnd(t);
    await tech.post('/api/findings', { traceId: t.id, eventIndex: open.index, status: 'confirmed', kind: 'open-conductor', note: null }).expect(201);
    const res = await tech.post(`/api/traces/${t.id}/healthy`, { eventIndex: open.index }).expect(409);
    expect(res.body.error.code).toBe('fault_confirmed');
    expect(res.body.error.message).toContain(`Event ${open.index + 1} of this trace is confirmed as a fault`);
    expect(await TraceOutcome.count({ where: { traceId: t.id } })).toBe(0);
  });
});

describe('POST /api/traces/:id/calibration', () => {
  it('files a calibration from the far end and the known length, into the review queue', async () => {
    const t = await upload(tech, stepTraceCsv({ faultM: 200.6, vf: 0.66 }), 'calibrate-me.csv', 'B');
    const end = farEnd(t);
    const res = await tech.post(`/api/traces/${t.id}/calibration`, { eventIndex: end.index, knownLengthM: 200 }).expect(201);
    // VF = 2L/(c·t): the file's open sits where 200.6 m of VF-0.66 cable puts it, so 200 m known gives
    // 0.66 · 200 / 200.6 = 0.6580 (hand-worked from the formula).
    expect(res.body.calibration.vf).toBeCloseTo(0.658, 3);
    expect(res.body.calibration.status).toBe('pending');
    expect(res.body.calibration.source).toBe('trace');
    expect(res.body.outcome.kind).toBe('calibration-filed');
    expect(res.body.outcome.calibrationId).toBe(res.body.calibration.id);

    const row = await CableCalibration.findByPk(res.body.calibration.id);
    expect(row!.traceId).toBe(t.id);
    expect(row!.knownLengthM).toBe(200);
    expect(row!.roundTripNs).toBe(end.roundTripNs);
    expect(row!.note).toContain(`trace ${t.id}`);

    const again = await tech.post(`/api/traces/${t.id}/calibration`, { eventIndex: end.index, knownLengthM: 200 }).expect(409);
    expect(again.body.error.code).toBe('calibration_pending');
    expect(await CableCalibration.count({ where: { traceId: t.id } })).toBe(1);
  });

  it('refuses a known length that makes the cable faster than light, and stores nothing', async () => {
    const t = await upload(tech, stepTraceCsv({ faultM: 150, vf: 0.66 }), 'too-long-known.csv');
    const res = await tech.post(`/api/traces/${t.id}/calibration`, { eventIndex: farEnd(t).index, knownLengthM: 400 }).expect(422);
    expect(res.body.error.code).toBe('vf_not_physical');
    const missing = await tech.post(`/api/traces/${t.id}/calibration`, { eventIndex: farEnd(t).index }).expect(400);
    expect(missing.body.error.fields[0]).toEqual({ field: 'knownLengthM', message: 'is required: the known length of the run, in metres' });
    expect(await CableCalibration.count({ where: { traceId: t.id } })).toBe(0);
    expect(await TraceOutcome.count({ where: { traceId: t.id } })).toBe(0);
  });
});

describe('archiving a trace', () => {
  it('hides a junk upload from the list, keeps it, and lets only an administrator restore it', async () => {
    const junk = await upload(tech, Buffer.from('\x89PNG\r\n\x1a\n not a trace at all'), 'photo-renamed.csv', 'A', 422);
    const listed = async (c: Client) => ((await c.get(`/api/traces?cableRunId=${runId}&pageSize=100`).expect(200)).body.items as Array<{ id: number }>).map((t) => t.id);
    expect(await listed(tech)).toContain(junk.id);

    const noReason = await tech.post(`/api/traces/${junk.id}/archive`, {}).expect(400);
    expect(noReason.body.error.fields).toEqual([{ field: 'reason', message: 'is required: say why' }]);

    const res = await tech.post(`/api/traces/${junk.id}/archive`, { reason: 'A photo saved as CSV by mistake' }).expect(200);
    expect(res.body.archived).toBe(true);
    expect(res.body.history.map((h: { action: string; reason: string; by: { name: string } }) => [h.action, h.reason, h.by.name])).toEqual([
      ['archived', 'A photo saved as CSV by mistake', 'Tess Tech'],
    ]);
    expect(await listed(tech)).not.toContain(junk.id);
    // Kept: the row and its history are still there, and the trace opens by its number.
    expect((await Trace.findByPk(junk.id))!.archivedAt).toBeInstanceOf(Date);
    await tech.get(`/api/traces/${junk.id}`).expect(200);

    const twice = await tech.post(`/api/traces/${junk.id}/archive`, { reason: 'again' }).expect(409);
    expect(twice.body.error.code).toBe('already_archived');

    const supervisor = await api.as('supervisor');
    const refused = await supervisor.post(`/api/traces/${junk.id}/restore`, { reason: 'needed after all' }).expect(403);
    expect(refused.body.error.code).toBe('forbidden');

    const admin = await api.as('admin');
    const archived = await admin.get('/api/traces/archived').expect(200);
    const item = archived.body.items.find((i: { id: number }) => i.id === junk.id);
    expect(item).toMatchObject({ originalName: 'photo-renamed.csv', status: 'failed', reason: 'A photo saved as CSV by mistake', archivedBy: { name: 'Tess Tech' } });
    await tech.get('/api/traces/archived').expect(403);

    const back = await admin.post(`/api/traces/${junk.id}/restore`, { reason: 'Kept for the instrument fault report' }).expect(200);
    expect(back.body.archived).toBe(false);
    expect(back.body.history.map((h: { action: string }) => h.action)).toEqual(['archived', 'restored']);
    expect(await listed(tech)).toContain(junk.id);
    expect((await TraceArchiveEvent.findAll({ where: { traceId: junk.id }, order: [['id', 'ASC']] })).map((e) => [e.action, e.reason])).toEqual([
      ['archived', 'A photo saved as CSV by mistake'],
      ['restored', 'Kept for the instrument fault report'],
    ]);
    const notArchived = await admin.post(`/api/traces/${junk.id}/restore`, { reason: 'once more' }).expect(409);
    expect(notArchived.body.error.code).toBe('not_archived');
  });

  it('lets a supervisor archive anyone’s trace, but not another technician, and never a trace behind a finding', async () => {
    const t = await upload(tech, stepTraceCsv({ faultM: 90, vf: 0.66 }), 'wrong-run.csv');
    await api.signIn('second.tech@example.com', 'correct-horse-battery').then(async (second) => {
      const res = await second.post(`/api/traces/${t.id}/archive`, { reason: 'not mine to archive' }).expect(403);
      expect(res.body.error.code).toBe('not_your_trace');
    });
    expect((await Trace.findByPk(t.id))!.archivedAt).toBeNull();
    const supervisor = await api.as('supervisor');
    await supervisor.post(`/api/traces/${t.id}/archive`, { reason: 'Uploaded to the wrong run' }).expect(200);
    const planner = await api.as('planner');
    expect((await planner.post(`/api/traces/${t.id}/archive`, { reason: 'x'.repeat(5) })).status).toBe(403);
    // Nor is a finding made from a trace once it is archived: it would bring junk back into the record.
    const onArchived = await supervisor.post('/api/findings', { traceId: t.id, eventIndex: farEnd(t).index, status: 'confirmed', kind: 'open-conductor', note: null }).expect(409);
    expect(onArchived.body.error).toMatchObject({ code: 'trace_archived', fields: [{ field: 'traceId', message: 'the trace is archived' }] });

    const decided = await upload(tech, stepTraceCsv({ faultM: 75, vf: 0.66 }), 'has-finding.csv');
    await tech.post('/api/findings', { traceId: decided.id, eventIndex: farEnd(decided).index, status: 'dismissed', kind: 'not-a-fault', note: null }).expect(201);
    const res = await tech.post(`/api/traces/${decided.id}/archive`, { reason: 'tidy up' }).expect(409);
    expect(res.body.error.code).toBe('has_findings');
    expect(await TraceArchiveEvent.count({ where: { traceId: decided.id } })).toBe(0);
  });
});

describe('the reference trace and archiving', () => {
  it('does not make an archived trace the reference of its run end, and changes nothing', async () => {
    const t = await upload(tech, stepTraceCsv({ faultM: 85, vf: 0.66 }), 'junk-reference.csv', 'B');
    await tech.post(`/api/traces/${t.id}/archive`, { reason: 'Probe slipped off the pair' }).expect(200);
    const supervisor = await api.as('supervisor');
    // Archiving refuses the reference (is_reference); the other way round must hold too.
    const res = await supervisor.put(`/api/traces/${t.id}/reference`, { isReference: true }).expect(409);
    expect(res.body.error.code).toBe('trace_archived');
    expect(res.body.error.fields).toEqual([{ field: 'traceId', message: 'the trace is archived' }]);
    expect((await Trace.findByPk(t.id))!.isReference).toBe(false);
    // Taking the mark off is still allowed (nothing to protect).
    await supervisor.put(`/api/traces/${t.id}/reference`, { isReference: false }).expect(200);
  });
});

describe('GET /api/traces/:id/samples', () => {
  it('draws a zoomed window of a 100 000-sample record at the file’s own detail, and a wide one min/max decimated', async () => {
    // 1 ns per sample (the fixture's grid), a one-sample spike at 61 237 ns.
    const t = await upload(tech, stepTraceCsv({ faultM: 180, vf: 0.66, samples: 100_000, spikeAt: 61_237 }), 'long-record.csv');
    expect(t.sampleCount).toBe(100_000);
    const narrow = await tech.get(`/api/traces/${t.id}/samples?fromNs=1000&toNs=1400&points=2000`).expect(200);
    // 1000…1399 ns lie inside, plus one sample either side: 402 samples, all drawn, 1 ns apart.
    expect(narrow.body.samplesInWindow).toBe(402);
    expect(narrow.body.samples).toHaveLength(402);
    expect(narrow.body.samples[0].t).toBeCloseTo(999, 6);
    expect(narrow.body.samples[401].t).toBeCloseTo(1400, 6);
    const steps = narrow.body.samples.slice(1).map((p: { t: number }, i: number) => p.t - narrow.body.samples[i].t);
    expect(Math.max(...steps) - Math.min(...steps)).toBeLessThan(1e-6);
    expect(steps[0]).toBeCloseTo(1, 6);
    const wide = await tech.get(`/api/traces/${t.id}/samples?fromNs=0&toNs=100000&points=500`).expect(200);
    expect(wide.body.samples.length).toBeLessThanOrEqual(1000);
    const spike = wide.body.samples.find((p: { t: number }) => Math.abs(p.t - 61_237) < 1e-6);
    // The fixture writes 0.5 V incident + 0.5 V from the open + 0.4 V spike, noise under 1 mV.
    expect(spike?.y).toBeGreaterThan(1.39);
    const bad = await tech.get(`/api/traces/${t.id}/samples?fromNs=500&toNs=100`).expect(400);
    expect(bad.body.error.fields).toEqual([{ field: 'toNs', message: 'must be later than fromNs' }]);
  });
});
