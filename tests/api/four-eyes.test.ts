import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { hashPassword } from '../../server/auth/passwords';
import { CableCalibration, CableType, CableTypeChange, Finding, FindingDecision, User } from '../../server/db/models';
import { findingEvents } from '../../server/findings/events';
import { startApi, TEST_PASSWORD, type Client, type TestApi } from './support/api';
import { captureLog } from './support/log-capture';
import { stepTraceCsv } from './support/field-fixtures';
import { supervisedRun } from './tickets.support';

let api: TestApi;
const log = captureLog();
let cableId: number;

const C = 299_792_458; // m/s, exact (SI definition of the metre)
/** The round-trip time in ns of a known length at a VF: t = 2L/(VF·c). */
const roundTripNs = (lengthM: number, vf: number) => ((2 * lengthM) / (vf * C)) * 1e9;

beforeAll(async () => {
  api = await startApi({ logLevel: 'info' }, { logDestination: log.stream });
  const hash = await hashPassword(TEST_PASSWORD);
  await User.create({ email: 'second.planner@example.com', name: 'Pia Second', role: 'planner', passwordHash: hash });
  await User.create({ email: 'second.tech@example.com', name: 'Tom Second', role: 'technician', passwordHash: hash });
  const planner = await api.as('planner');
  const res = await planner
    .post('/api/cables', {
      name: 'Four-eyes foam coax',
      construction: 'coax',
      dielectric: 'foamed polyethylene',
      z0Ohm: 75,
      vf: 0.82,
      vfTolerance: 0.03,
      vfSource: 'handbook',
      vfReference: 'Foam PE coax, handbook range',
    })
    .expect(201);
  cableId = res.body.id;
});
afterAll(() => api.close());

async function file(c: Client, vf: number) {
  const res = await c.post('/api/calibrations', { cableTypeId: cableId, knownLengthM: 300, roundTripNs: roundTripNs(300, vf) }).expect(201);
  return res.body.id as number;
}

describe('accepting a calibration', () => {
  it('is refused to the planner who filed it, and the library VF stays', async () => {
    const planner = await api.as('planner');
    const id = await file(planner, 0.8);
    const res = await planner.post(`/api/calibrations/${id}/accept`, { note: 'mine, looks right' }).expect(403);
    expect(res.body.error).toEqual({
      code: 'own_calibration',
      message: `You filed calibration #${id}, so another planner accepts it: a second person checks every change to the library VF.`,
    });
    expect((await CableCalibration.findByPk(id))!.status).toBe('pending');
    expect((await CableType.findByPk(cableId))!.vf).toBe(0.82);
  });

  it('is open to another planner', async () => {
    const planner = await api.as('planner');
    const id = await file(planner, 0.81);
    const other = await api.signIn('second.planner@example.com', TEST_PASSWORD);
    const res = await other.post(`/api/calibrations/${id}/accept`, {}).expect(200);
    expect(res.body.calibration).toMatchObject({ status: 'accepted', reviewedBy: { name: 'Pia Second' }, submittedBy: { name: 'Pat Plan' } });
    expect((await CableType.findByPk(cableId))!.vf).toBe(0.81);
  });

  it('lets an administrator accept their own only with a reason, kept in the library history and the log', async () => {
    const admin = await api.as('admin');
    const id = await file(admin, 0.83);
    const bare = await admin.post(`/api/calibrations/${id}/accept`, {}).expect(400);
    expect(bare.body.error.code).toBe('override_reason_required');
    expect(bare.body.error.fields).toEqual([{ field: 'note', message: 'give the reason for accepting your own calibration (at least 10 characters)' }]);
    expect((await CableCalibration.findByPk(id))!.status).toBe('pending');

    const reason = 'Only planner is on leave; drum length verified twice';
    const res = await admin.post(`/api/calibrations/${id}/accept`, { note: reason }).expect(200);
    expect(res.body.calibration).toMatchObject({ status: 'accepted', reviewReason: `Own calibration accepted by override: ${reason}` });
    const change = await CableTypeChange.findOne({ where: { calibrationId: id } });
    expect(change!.reason).toBe(`Accepted field calibration #${id} by its own submitter, an administrator, without a second reviewer: ${reason}`);
    expect(change!.changedById).toBe(api.users.admin.id);
    expect(log.security('calibration-own-accepted')).toEqual([
      expect.objectContaining({ level: 40, calibrationId: id, cableTypeId: cableId, actorId: api.users.admin.id, reason }),
    ]);
  });
});

describe('deciding an event', () => {
  async function uploadAs(c: Client, runId: number, faultM: number) {
    const res = await c
      .postRaw('/api/traces')
      .field('cableRunId', String(runId))
      .field('end', 'A')
      .attach('file', Buffer.from(stepTraceCsv({ faultM, vf: 0.66 })), `four-eyes-${faultM}.csv`)
      .expect(201);
    return res.body.traces[0].id as number;
  }

  it('belongs to the technician who uploaded the trace, not to another technician', async () => {
    const fx = await supervisedRun(api, 'Four-eyes run A');
    const tess = await api.as('technician');
    const traceId = await uploadAs(tess, fx.run.id, 80);
    const tom = await api.signIn('second.tech@example.com', TEST_PASSWORD);
    const res = await tom.post('/api/findings', { traceId, eventIndex: 0, status: 'dismissed', kind: 'not-a-fault' }).expect(403);
    expect(res.body.error).toEqual({ code: 'not_your_trace', message: `Trace ${traceId} was uploaded by Tess Tech: deciding its events is theirs or a supervisor's.` });
    expect(await Finding.count({ where: { traceId } })).toBe(0);
    const own = await tess.post('/api/findings', { traceId, eventIndex: 0, status: 'confirmed', kind: 'open-conductor' }).expect(201);
    expect(await FindingDecision.findAll({ where: { findingId: own.body.id }, raw: true })).toEqual([
      expect.objectContaining({ action: 'decided', fromStatus: null, toStatus: 'confirmed', kind: 'open-conductor', reason: null, decidedById: api.users.technician.id }),
    ]);
  });

  it('may be reversed by a supervisor with a reason, both ways, each step kept in the history', async () => {
    const fx = await supervisedRun(api, 'Four-eyes run B');
    const tess = await api.as('technician');
    const traceId = await uploadAs(tess, fx.run.id, 110);
    const f = (await tess.post('/api/findings', { traceId, eventIndex: 0, status: 'dismissed', kind: 'not-a-fault', note: 'looks like a splice' }).expect(201)).body;
    const sup = await api.as('supervisor');

    // The technician may not reverse, even their own decision.
    const techTry = await tess.post(`/api/findings/${f.id}/reverse`, { to: 'confirmed', reason: 'changed my mind about it' }).expect(403);
    expect(techTry.body.error.code).toBe('forbidden');
    const noReason = await sup.post(`/api/findings/${f.id}/reverse`, { to: 'confirmed', reason: 'short' }).expect(400);
    expect(noReason.body.error.fields).toEqual([{ field: 'reason', message: 'must be at least 10 characters: say why the decision is reversed' }]);
    const noKind = await sup.post(`/api/findings/${f.id}/reverse`, { to: 'confirmed', reason: 'No splice on the as-built at that distance' }).expect(400);
    expect(noKind.body.error).toMatchObject({ code: 'kind_required', fields: [{ field: 'kind', message: 'is required: what kind of fault it is' }] });
    expect((await Finding.findByPk(f.id))!.status).toBe('dismissed');

    const heard: number[] = [];
    const listener = (id: number) => heard.push(id);
    findingEvents.on('confirmed', listener);
    const confirmed = await sup.post(`/api/findings/${f.id}/reverse`, { to: 'confirmed', reason: 'No splice on the as-built at that distance', kind: 'splice-fault' }).expect(200);
    findingEvents.off('confirmed', listener);
    expect(heard).toEqual([f.id]);
    expect(confirmed.body.finding).toMatchObject({ id: f.id, status: 'confirmed', kind: 'splice-fault', confirmedBy: { id: api.users.supervisor.id } });

    const dismissed = await sup.post(`/api/findings/${f.id}/reverse`, { to: 'dismissed', reason: 'Crew found the splice dry and sound' }).expect(200);
    expect(dismissed.body.finding).toMatchObject({ status: 'dismissed', kind: 'not-a-fault' });
    const history = (await sup.get(`/api/findings/${f.id}/decisions`).expect(200)).body;
    expect(history.map((d: { action: string; fromStatus: string | null; toStatus: string; reason: string | null; decidedBy: { name: string } }) => [d.action, d.fromStatus, d.toStatus, d.reason, d.decidedBy.name])).toEqual([
      ['decided', null, 'dismissed', null, 'Tess Tech'],
      ['reversed', 'dismissed', 'confirmed', 'No splice on the as-built at that distance', 'Sol Super'],
      ['reversed', 'confirmed', 'dismissed', 'Crew found the splice dry and sound', 'Sol Super'],
    ]);
    expect(await FindingDecision.count({ where: { findingId: f.id } })).toBe(3);
    expect(log.security('finding-reversed').filter((l) => l.findingId === f.id).map((l) => l.to)).toEqual(['confirmed', 'dismissed']);
  });

  it('is not dismissed while the fault is on an open repair ticket', async () => {
    const fx = await supervisedRun(api, 'Four-eyes run C');
    const tess = await api.as('technician');
    const traceId = await uploadAs(tess, fx.run.id, 60);
    const f = (await tess.post('/api/findings', { traceId, eventIndex: 0, status: 'confirmed', kind: 'open-conductor' }).expect(201)).body;
    const sup = await api.as('supervisor');
    const ticket = (await sup.post('/api/tickets', { findingIds: [f.id] }).expect(201)).body;
    const res = await sup.post(`/api/findings/${f.id}/reverse`, { to: 'dismissed', reason: 'Second look says it is the cable end' }).expect(409);
    expect(res.body.error).toEqual({
      code: 'on_open_ticket',
      message: `Finding ${f.id} is on open repair ticket #${ticket.id}: withdraw or close the ticket before dismissing it.`,
    });
    expect((await Finding.findByPk(f.id))!.status).toBe('confirmed');
    expect(await FindingDecision.count({ where: { findingId: f.id } })).toBe(1);
  });

  it('lets a supervisor decide an event on anyone’s trace', async () => {
    const fx = await supervisedRun(api, 'Four-eyes run D');
    const traceId = await uploadAs(await api.as('technician'), fx.run.id, 140);
    const sup = await api.as('supervisor');
    await sup.post('/api/findings', { traceId, eventIndex: 0, status: 'confirmed', kind: 'open-conductor' }).expect(201);
  });
});
