import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { CableRun, Finding, MailJob, Measurement, RequestReceipt, Ticket, TicketCloseout, TicketEvent } from '../../server/db/models';
import { forgetOldReceipts, RECEIPTS_KEPT_DAYS } from '../../server/http/idempotency';
import { startApi, type Client, type TestApi } from './support/api';
import { pauseFirstRead } from './support/pause';
import { stepTraceCsv } from './support/field-fixtures';
import { confirmedFinding, supervisedRun } from './tickets.support';

/**
 * A phone with poor signal sends a finding, a reading or a close-out, and the answer never comes back: it sends
 * the same request again under the same Idempotency-Key. The server makes the record once and answers every
 * repeat with the first answer's status and that record.
 */
let api: TestApi;
let fx: Awaited<ReturnType<typeof supervisedRun>>;
let tech: Client;

beforeAll(async () => {
  api = await startApi();
  fx = await supervisedRun(api, 'Repeat run');
  tech = await api.as('technician');
});
afterAll(() => api.close());

async function uploadTrace(faultM: number): Promise<number> {
  const res = await tech
    .postRaw('/api/traces')
    .field('cableRunId', String(fx.run.id))
    .field('end', 'A')
    .attach('file', Buffer.from(stepTraceCsv({ faultM, vf: 0.66 })), `repeat-${faultM}.csv`)
    .expect(201);
  return res.body.traces[0].id as number;
}

/** A Murray loop reading on the run's two 200 m, 16 mm² copper conductors. */
const murray = (findingId: number, ratio: number) => ({
  findingId,
  kind: 'murray',
  instrument: 'Loop bridge, serial HV-0042',
  measuredAt: '2026-03-02T10:15:00Z',
  readings: { fromEnd: 'A', ratio, faulty: [{ lengthM: 200, material: 'copper', sizeMm2: 16 }], temperatureC: 11 },
});

describe('a decision sent again under its key', () => {
  it('is answered with the first finding, 201, and no second decision is tried', async () => {
    const traceId = await uploadTrace(90);
    const body = { traceId, eventIndex: 0, status: 'confirmed', kind: 'open-conductor', note: 'by the gate' };
    const first = await tech.post('/api/findings', body).set('Idempotency-Key', 'decision-1b7e6a40').expect(201);
    expect(first.headers['idempotent-replayed']).toBeUndefined();
    // The same values with the keys in another order are the same request.
    const again = await tech
      .post('/api/findings', { note: 'by the gate', kind: 'open-conductor', status: 'confirmed', eventIndex: 0, traceId })
      .set('Idempotency-Key', 'decision-1b7e6a40')
      .expect(201);
    expect(again.headers['idempotent-replayed']).toBe('true');
    expect(again.body.id).toBe(first.body.id);
    expect(again.body.status).toBe('confirmed');
    expect(again.body.note).toBe('by the gate');
    expect(await Finding.count({ where: { traceId } })).toBe(1);
    expect(await RequestReceipt.count({ where: { idempotencyKey: 'decision-1b7e6a40' } })).toBe(1);
    // Without the key, the second decision on that event is still refused as before.
    const plain = await tech.post('/api/findings', body).expect(409);
    expect(plain.body.error.code).toBe('already_decided');
  });

  it('refuses the same key with other values, naming the header, and changes nothing', async () => {
    const traceId = await uploadTrace(110);
    const first = await tech
      .post('/api/findings', { traceId, eventIndex: 0, status: 'confirmed', kind: 'open-conductor' })
      .set('Idempotency-Key', 'decision-5c0d9e12')
      .expect(201);
    const other = await tech
      .post('/api/findings', { traceId, eventIndex: 0, status: 'dismissed', kind: 'not-a-fault' })
      .set('Idempotency-Key', 'decision-5c0d9e12')
      .expect(422);
    expect(other.body.error.code).toBe('idempotency_key_reused');
    expect(other.body.error.message).toMatch(/already used for the same request with other values/);
    expect(other.body.error.fields).toEqual([{ field: 'Idempotency-Key', message: 'already used with other values' }]);
    expect((await Finding.findByPk(first.body.id))!.status).toBe('confirmed');
    const bad = await tech.post('/api/findings', { traceId, eventIndex: 0, status: 'confirmed', kind: 'open-conductor' }).set('Idempotency-Key', 'short').expect(400);
    expect(bad.body.error.code).toBe('bad_idempotency_key');
    expect(bad.body.error.fields[0].field).toBe('Idempotency-Key');
  });

  it('ends two copies sent together in one finding, both answered with it', async () => {
    const traceId = await uploadTrace(130);
    const body = { traceId, eventIndex: 0, status: 'confirmed', kind: 'open-conductor' };
    const [a, b] = await Promise.all([
      tech.post('/api/findings', body).set('Idempotency-Key', 'decision-77aa0c3e'),
      tech.post('/api/findings', body).set('Idempotency-Key', 'decision-77aa0c3e'),
    ]);
    expect([a.status, b.status]).toEqual([201, 201]);
    expect(a.body.id).toBe(b.body.id);
    expect([a.headers['idempotent-replayed'], b.headers['idempotent-replayed']].filter(Boolean)).toEqual(['true']);
    expect(await Finding.count({ where: { traceId } })).toBe(1);
  });
});

describe('a reading sent again under its key', () => {
  let findingId: number;
  beforeAll(async () => {
    findingId = (await confirmedFinding(api, fx.run.id, 120)).id;
  });

  it('is stored once and the repeat answered with it', async () => {
    const before = await Measurement.count({ where: { findingId } });
    const first = await tech.post('/api/measurements', murray(findingId, 0.3)).set('Idempotency-Key', 'reading-0d4c7f1a').expect(201);
    const again = await tech.post('/api/measurements', murray(findingId, 0.3)).set('Idempotency-Key', 'reading-0d4c7f1a').expect(201);
    expect(again.headers['idempotent-replayed']).toBe('true');
    expect(again.body.id).toBe(first.body.id);
    // 0.3 of a loop of two 200 m conductors = 120 m from A (hand-worked).
    expect(again.body.estimate.distanceFromAM).toBeCloseTo(120, 6);
    expect(await Measurement.count({ where: { findingId } })).toBe(before + 1);
  });

  it('keeps no receipt for a refused try, so the corrected one goes through under the same key', async () => {
    const refused = await tech.post('/api/measurements', murray(999_999, 0.3)).set('Idempotency-Key', 'reading-9e21b3c4').expect(422);
    expect(refused.body.error.code).toBe('no_such_finding');
    expect(await RequestReceipt.count({ where: { idempotencyKey: 'reading-9e21b3c4' } })).toBe(0);
    const ok = await tech.post('/api/measurements', murray(findingId, 0.25)).set('Idempotency-Key', 'reading-9e21b3c4').expect(201);
    expect(ok.body.findingId).toBe(findingId);
  });

  it('refuses a key already used for another kind of request', async () => {
    const res = await tech.post('/api/measurements', murray(findingId, 0.3)).set('Idempotency-Key', 'decision-1b7e6a40').expect(422);
    expect(res.body.error.code).toBe('idempotency_key_reused');
    expect(res.body.error.message).toContain('another request (POST /api/findings)');
  });

  it('is a key of the account that sent it: another account’s same key is its own reading', async () => {
    const sup = await api.as('supervisor');
    const mine = await tech.post('/api/measurements', murray(findingId, 0.31)).set('Idempotency-Key', 'reading-shared-0001').expect(201);
    const theirs = await sup.post('/api/measurements', murray(findingId, 0.31)).set('Idempotency-Key', 'reading-shared-0001').expect(201);
    expect(theirs.body.id).not.toBe(mine.body.id);
    expect(theirs.body.recordedBy.id).toBe(api.users.supervisor.id);
  });

  it('stores one reading when the repeat arrives while the first is still being stored', async () => {
    const before = await Measurement.count({ where: { findingId } });
    // The first try is held inside its transaction, after reading the cable run and before storing anything.
    const pause = pauseFirstRead(CableRun, 'hold-first-reading', (result) => (result as { id?: number } | null)?.id === fx.run.id);
    const first = tech.post('/api/measurements', murray(findingId, 0.35)).set('Idempotency-Key', 'reading-4f8e2d6b').then((r) => r);
    await pause.reached;
    // The repeat looks for an earlier answer while there is none yet, then goes on to store its own.
    let lookedUp!: () => void;
    const secondLookedUp = new Promise<void>((r) => (lookedUp = r));
    RequestReceipt.addHook('afterFind', 'second-looked-up', (result: unknown, options: { transaction?: unknown }) => {
      if (!options.transaction && result === null) lookedUp();
    });
    const second = tech.post('/api/measurements', murray(findingId, 0.35)).set('Idempotency-Key', 'reading-4f8e2d6b').then((r) => r);
    await secondLookedUp;
    RequestReceipt.removeHook('afterFind', 'second-looked-up');
    pause.release();
    const [a, b] = await Promise.all([first, second]);
    expect([a.status, b.status]).toEqual([201, 201]);
    expect(b.body.id).toBe(a.body.id);
    expect(b.headers['idempotent-replayed']).toBe('true');
    expect(await Measurement.count({ where: { findingId } })).toBe(before + 1);
    expect(await RequestReceipt.count({ where: { idempotencyKey: 'reading-4f8e2d6b' } })).toBe(1);
  });
});

describe('a close-out sent again under its key', () => {
  it('closes the repair once and answers the repeat with the fixed ticket', async () => {
    const run = await supervisedRun(api, 'Repeat close-out run');
    const finding = await confirmedFinding(api, run.run.id, 100);
    const sup = await api.as('supervisor');
    const ticketId = (await sup.post('/api/tickets', { findingIds: [finding.id], assigneeId: api.users.technician.id }).expect(201)).body.id as number;
    await tech.post(`/api/tickets/${ticketId}/status`, { to: 'under-way' }).expect(200);
    const body = { found: { method: 'distance', fromEnd: 'A', distanceM: 104 }, cause: 'water-ingress', workDone: 'New straight joint' };
    const first = await tech.post(`/api/tickets/${ticketId}/closeout`, body).set('Idempotency-Key', 'closeout-3a9f0b7d').expect(200);
    expect(first.body.status).toBe('fixed');
    const again = await tech.post(`/api/tickets/${ticketId}/closeout`, body).set('Idempotency-Key', 'closeout-3a9f0b7d').expect(200);
    expect(again.headers['idempotent-replayed']).toBe('true');
    expect(again.body.id).toBe(ticketId);
    expect(again.body.status).toBe('fixed');
    expect(again.body.closeouts).toHaveLength(1);
    expect(again.body.closeouts[0].foundDistanceM).toBeCloseTo(104, 9);
    expect(await TicketCloseout.count({ where: { ticketId } })).toBe(1);
    expect((await Ticket.findByPk(ticketId))!.status).toBe('fixed');
    // A close-out of the fixed repair without the key is still refused as before.
    const plain = await tech.post(`/api/tickets/${ticketId}/closeout`, body).expect(409);
    expect(plain.body.error.code).toBe('closeout_not_allowed');
  });
});

describe('a ticket comment sent again under its key', () => {
  it('is recorded and mailed once, the repeat answered with the ticket; the same key with other words is refused', async () => {
    const run = await supervisedRun(api, 'Repeat comment run');
    const finding = await confirmedFinding(api, run.run.id, 90);
    const sup = await api.as('supervisor');
    const ticketId = (await sup.post('/api/tickets', { findingIds: [finding.id], assigneeId: api.users.technician.id }).expect(201)).body.id as number;
    // The supervisor's words reach the assignee by e-mail: a repeat must not send them twice.
    const body = { comment: 'Pit lid reported seized; take a lifter' };
    const first = await sup.post(`/api/tickets/${ticketId}/comments`, body).set('Idempotency-Key', 'comment-6d2c41e8').expect(200);
    expect(first.headers['idempotent-replayed']).toBeUndefined();
    const again = await sup.post(`/api/tickets/${ticketId}/comments`, body).set('Idempotency-Key', 'comment-6d2c41e8').expect(200);
    expect(again.headers['idempotent-replayed']).toBe('true');
    expect(again.body.id).toBe(ticketId);
    expect(await TicketEvent.count({ where: { ticketId, kind: 'comment', comment: body.comment } })).toBe(1);
    expect(await MailJob.count({ where: { ticketId, kind: 'ticket-comment' } })).toBe(1);
    const other = await sup
      .post(`/api/tickets/${ticketId}/comments`, { comment: 'Lifter is in the van' })
      .set('Idempotency-Key', 'comment-6d2c41e8')
      .expect(422);
    expect(other.body.error.code).toBe('idempotency_key_reused');
    expect(await TicketEvent.count({ where: { ticketId, kind: 'comment' } })).toBe(1);
    // Without a key each comment is its own, as before.
    await sup.post(`/api/tickets/${ticketId}/comments`, body).expect(200);
    expect(await TicketEvent.count({ where: { ticketId, kind: 'comment', comment: body.comment } })).toBe(2);
  });
});

describe('a ticket edit sent again under its key', () => {
  it('records and mails its change and comment once; a repeat of a comment-only edit is not a second comment', async () => {
    const run = await supervisedRun(api, 'Repeat edit run');
    const finding = await confirmedFinding(api, run.run.id, 95);
    const sup = await api.as('supervisor');
    const ticketId = (await sup.post('/api/tickets', { findingIds: [finding.id], assigneeId: api.users.technician.id }).expect(201)).body.id as number;
    const mailsBefore = await MailJob.count({ where: { ticketId } });
    // The edit form sends the new priority with a word for the assignee; its answer is lost and it is sent again.
    // The repeat's priority is now the ticket's own, so without the key it was taken as a comment-only edit and
    // the words were added and mailed a second time.
    const edit = { priority: 'urgent', comment: 'Customer on life support at the far end', basedOn: { priority: 'normal' } };
    const first = await sup.patch(`/api/tickets/${ticketId}`, edit).set('Idempotency-Key', 'edit-3a91c07e').expect(200);
    expect(first.headers['idempotent-replayed']).toBeUndefined();
    expect(first.body.priority).toBe('urgent');
    const again = await sup.patch(`/api/tickets/${ticketId}`, edit).set('Idempotency-Key', 'edit-3a91c07e').expect(200);
    expect(again.headers['idempotent-replayed']).toBe('true');
    expect(again.body.priority).toBe('urgent');
    const events = await TicketEvent.findAll({ where: { ticketId }, order: [['id', 'ASC']] });
    expect(events.filter((e) => e.comment === edit.comment).map((e) => e.kind)).toEqual(['updated']);
    expect(await MailJob.count({ where: { ticketId } })).toBe(mailsBefore + 1);

    // An edit of unchanged values is kept as a comment: sent twice under one key, it is one comment and one mail.
    const note = { priority: 'urgent', comment: 'Gate code is 4417' };
    await sup.patch(`/api/tickets/${ticketId}`, note).set('Idempotency-Key', 'edit-5be2f310').expect(200);
    const noteAgain = await sup.patch(`/api/tickets/${ticketId}`, note).set('Idempotency-Key', 'edit-5be2f310').expect(200);
    expect(noteAgain.headers['idempotent-replayed']).toBe('true');
    expect(await TicketEvent.count({ where: { ticketId, kind: 'comment', comment: note.comment } })).toBe(1);
    expect(await MailJob.count({ where: { ticketId } })).toBe(mailsBefore + 2);
    // The same key with other values is refused and changes nothing.
    const other = await sup.patch(`/api/tickets/${ticketId}`, { priority: 'low' }).set('Idempotency-Key', 'edit-5be2f310').expect(422);
    expect(other.body.error.code).toBe('idempotency_key_reused');
    expect((await Ticket.findByPk(ticketId))!.priority).toBe('urgent');
  });
});

describe('receipts past their kept days', () => {
  it('are forgotten (a repeat then makes a new record), while a recent receipt still answers its repeat', async () => {
    const traceId = await uploadTrace(145);
    const finding = await tech.post('/api/findings', { traceId, eventIndex: 0, status: 'confirmed', kind: 'open-conductor' }).expect(201);
    const findingId = finding.body.id as number;
    const old = await tech.post('/api/measurements', murray(findingId, 0.41)).set('Idempotency-Key', 'reading-old-7f3e2d1c').expect(201);
    const recent = await tech.post('/api/measurements', murray(findingId, 0.42)).set('Idempotency-Key', 'reading-new-7f3e2d1c').expect(201);
    const day = 24 * 60 * 60 * 1000;
    await api.app.ctx.sequelize.query('UPDATE request_receipts SET created_at = ? WHERE idempotency_key = ?', {
      replacements: [new Date(Date.now() - (RECEIPTS_KEPT_DAYS + 1) * day), 'reading-old-7f3e2d1c'],
    });
    // The next forgetting (at most hourly, by whichever create comes next) takes the old receipt only.
    await forgetOldReceipts(Date.now() + 2 * 60 * 60 * 1000);
    expect(await RequestReceipt.count({ where: { idempotencyKey: 'reading-old-7f3e2d1c' } })).toBe(0);
    expect(await RequestReceipt.count({ where: { idempotencyKey: 'reading-new-7f3e2d1c' } })).toBe(1);
    const oldAgain = await tech.post('/api/measurements', murray(findingId, 0.41)).set('Idempotency-Key', 'reading-old-7f3e2d1c').expect(201);
    expect(oldAgain.headers['idempotent-replayed']).toBeUndefined();
    expect(oldAgain.body.id).not.toBe(old.body.id);
    const recentAgain = await tech.post('/api/measurements', murray(findingId, 0.42)).set('Idempotency-Key', 'reading-new-7f3e2d1c').expect(201);
    expect(recentAgain.headers['idempotent-replayed']).toBe('true');
    expect(recentAgain.body.id).toBe(recent.body.id);
    expect(await Measurement.count({ where: { findingId } })).toBe(3);
  });
});

describe('a failed forgetting of old receipts', () => {
  it('is written to the log as a warning, leaves the receipts, and is tried again by the next forgetting', async () => {
    const day = 24 * 60 * 60 * 1000;
    const traceId = await uploadTrace(160);
    const finding = await tech.post('/api/findings', { traceId, eventIndex: 0, status: 'confirmed', kind: 'open-conductor' }).expect(201);
    await tech.post('/api/measurements', murray(finding.body.id as number, 0.43)).set('Idempotency-Key', 'reading-stale-4b9a8e21').expect(201);
    await api.app.ctx.sequelize.query('UPDATE request_receipts SET created_at = ? WHERE idempotency_key = ?', {
      replacements: [new Date(Date.now() - (RECEIPTS_KEPT_DAYS + 5) * day), 'reading-stale-4b9a8e21'],
    });
    const warn = vi.fn();
    const broken = vi.spyOn(RequestReceipt, 'destroy').mockRejectedValueOnce(new Error('database is locked'));
    try {
      // Far enough ahead of every earlier forgetting in this file that the hourly limit lets it run.
      const later = Date.now() + 10 * 60 * 60 * 1000;
      await forgetOldReceipts(later, { warn });
      expect(warn).toHaveBeenCalledTimes(1);
      const [fields, message] = warn.mock.calls[0] as [{ err: Error }, string];
      expect(fields.err.message).toBe('database is locked');
      expect(message).toBe(`Forgetting request receipts older than ${RECEIPTS_KEPT_DAYS} days failed; the next create tries again.`);
      expect(await RequestReceipt.count({ where: { idempotencyKey: 'reading-stale-4b9a8e21' } })).toBe(1);
      // The failure does not count as this hour's forgetting: the very next one runs and takes the receipt.
      await forgetOldReceipts(later + 1000, { warn });
      expect(warn).toHaveBeenCalledTimes(1);
      expect(await RequestReceipt.count({ where: { idempotencyKey: 'reading-stale-4b9a8e21' } })).toBe(0);
    } finally {
      broken.mockRestore();
    }
  });
});
