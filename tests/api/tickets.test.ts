import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { hashPassword } from '../../server/auth/passwords';
import { CableCalibration, MailJob, Ticket, TicketCloseout, TicketEvent, User } from '../../server/db/models';
import type { OutboxMessageView } from '../../shared/schemas/outbox';
import type { TicketDetail, TicketSummary } from '../../shared/schemas/tickets';
import { startApi, TEST_PASSWORD, type Client, type TestApi } from './support/api';
import { closedPort, eventually, startFlakyRelay, type TestRelay } from './mail.support';
import { confirmedFinding, supervisedRun } from './tickets.support';

const PUBLIC_URL = 'https://rholog.example.com';

async function outboxFor(api: TestApi, to: string, subject: RegExp): Promise<OutboxMessageView> {
  const admin = await api.as('admin');
  return eventually(async () => {
    const res = await admin.get(`/api/outbox?to=${encodeURIComponent(to)}`).expect(200);
    return (res.body.items as OutboxMessageView[]).find((m) => subject.test(m.subject));
  }, `an e-mail to ${to} matching ${subject}`);
}

describe('repair tickets', () => {
  let api: TestApi;
  let fx: Awaited<ReturnType<typeof supervisedRun>>;
  let sup: Client;
  let tech: Client;
  let otherTech: Client;
  let finding: Awaited<ReturnType<typeof confirmedFinding>>;

  beforeAll(async () => {
    api = await startApi({ publicUrl: PUBLIC_URL });
    fx = await supervisedRun(api, 'Ticket run');
    await User.create({ email: 'second.tech@example.com', name: 'Sam Second', role: 'technician', passwordHash: await hashPassword(TEST_PASSWORD) });
    sup = await api.as('supervisor');
    tech = await api.as('technician');
    otherTech = await api.signIn('second.tech@example.com', TEST_PASSWORD);
    finding = await confirmedFinding(api, fx.run.id, 100);
  });
  afterAll(() => api?.close());

  it('e-mails the site’s supervisor when a finding is confirmed, over SMTP, readable in the outbox', async () => {
    const msg = await outboxFor(api, 'supervisor.test@example.com', /^Fault confirmed/);
    expect(msg.subject).toContain(fx.site.name);
    expect(msg.subject).toContain('Ticket run');
    expect(msg.body).toContain(`Site:`);
    expect(msg.body).toContain(fx.site.name);
    expect(msg.body).toContain('Ticket run (Cabinet C-1 → Pole 14)');
    // Hand-worked: 100 m of cable from A is 95 m of route, 15 m past MH-2 toward P-7; said once, as where to dig.
    expect(msg.body).toMatch(/Where to dig: +15\.\d+ m past manhole MH-2 toward pedestal P-7/);
    expect(msg.body).not.toContain('Route position:');
    // The one reading is the whole best location: said so, as on the finding page, rather than its distance and window again.
    expect(msg.body.replace(/\n {2,}/g, ' ')).toMatch(/This TDR reading: +The best location above is this reading alone: the same distance, window and place to dig\./);
    expect(msg.body).not.toContain('Its own window');
    expect(msg.body).toContain(`${PUBLIC_URL}/findings/${finding.id}`);
    expect(msg.html).toContain(`href="${PUBLIC_URL}/findings/${finding.id}"`);
  });

  let ticketId: number;

  it('raises a ticket from a finding, assigns it and e-mails the assignee', async () => {
    // Due 20 May of next year: in the future whenever the test runs, and within the five years allowed.
    const due = `${new Date().getUTCFullYear() + 1}-05-20`;
    const res = await sup.post('/api/tickets', { findingIds: [finding.id], assigneeId: api.users.technician.id, priority: 'high', dueDate: due, notes: 'Gate code 4412' }).expect(201);
    const t = res.body as TicketDetail;
    ticketId = t.id;
    expect(t.status).toBe('assigned');
    expect(t.priority).toBe('high');
    expect(t.dueDate).toBe(due);
    expect(t.assignee).toEqual({ id: api.users.technician.id, name: 'Tess Tech' });
    expect(t.title).toBe('Open conductor on Ticket run');
    expect(t.findings.map((f) => f.id)).toEqual([finding.id]);
    expect(t.timeline.map((e) => [e.kind, e.fromStatus, e.toStatus, e.actor.name])).toEqual([
      ['created', null, 'raised', 'Sol Super'],
      ['assigned', 'raised', 'assigned', 'Sol Super'],
    ]);
    const mail = await outboxFor(api, 'technician.test@example.com', new RegExp(`^Ticket ${t.id} assigned to you`));
    expect(mail.body).toContain('Priority:');
    // Dates in the one style the screens use.
    expect(mail.body).toMatch(new RegExp(`Due: +20 May ${new Date().getUTCFullYear() + 1}`));
    expect(mail.body).toContain('High');
    expect(mail.body).toContain('Gate code 4412');
    expect(mail.body).toContain(`${PUBLIC_URL}/tickets/${t.id}`);
  });

  it('refuses a second live ticket for the same finding, unknown findings and a non-technician assignee', async () => {
    const dup = await sup.post('/api/tickets', { findingIds: [finding.id] }).expect(409);
    expect(dup.body.error.code).toBe('finding_already_ticketed');
    expect(dup.body.error.fields[0].field).toBe('findingIds');
    const unknown = await sup.post('/api/tickets', { findingIds: [987654] }).expect(422);
    expect(unknown.body.error.fields[0]).toEqual({ field: 'findingIds', message: 'finding 987654 does not exist' });
    const other = await confirmedFinding(api, fx.run.id, 60);
    const planner = await sup.post('/api/tickets', { findingIds: [other.id], assigneeId: api.users.planner.id }).expect(422);
    expect(planner.body.error.fields[0].field).toBe('assigneeId');
    const empty = await sup.post('/api/tickets', { findingIds: [], dueDate: '2031-02-30' }).expect(400);
    expect(empty.body.error.fields.map((f: { field: string }) => f.field).sort()).toEqual(['dueDate', 'findingIds']);
    const past = await sup.post('/api/tickets', { findingIds: [other.id], dueDate: '2020-01-01' }).expect(400);
    expect(past.body.error.fields).toEqual([{ field: 'dueDate', message: 'is in the past' }]);
    const far = await sup.post('/api/tickets', { findingIds: [other.id], dueDate: '9999-12-31' }).expect(400);
    expect(far.body.error.fields).toEqual([{ field: 'dueDate', message: 'is more than five years ahead' }]);
    expect(await Ticket.count()).toBe(1);
  });

  it('lets only the assignee or a supervisor move it, and never to closed without a close-out', async () => {
    const stranger = await otherTech.post(`/api/tickets/${ticketId}/status`, { to: 'under-way' }).expect(403);
    expect(stranger.body.error.message).toContain("Only the ticket's assignee or a supervisor");
    await (await api.as('planner')).post(`/api/tickets/${ticketId}/status`, { to: 'under-way' }).expect(403);
    const skip = await tech.post(`/api/tickets/${ticketId}/status`, { to: 'signed-off' }).expect(409);
    expect(skip.body.error.code).toBe('status_step_not_allowed');
    const supSkip = await sup.post(`/api/tickets/${ticketId}/status`, { to: 'signed-off' }).expect(409);
    expect(supSkip.body.error.message).toContain('close-out');
    await tech.post(`/api/tickets/${ticketId}/status`, { to: 'fixed' }).expect(409);
    const withdraw = await tech.post(`/api/tickets/${ticketId}/status`, { to: 'withdrawn' }).expect(403);
    expect(withdraw.body.error.message).toContain('Only a supervisor');
    const bad = await tech.post(`/api/tickets/${ticketId}/status`, { to: 'done' }).expect(400);
    expect(bad.body.error.fields[0].field).toBe('to');
    const started = await tech.post(`/api/tickets/${ticketId}/status`, { to: 'under-way', comment: 'On site, pit open' }).expect(200);
    expect(started.body.status).toBe('under-way');
    expect(started.body.timeline.at(-1)).toMatchObject({ kind: 'status', fromStatus: 'assigned', toStatus: 'under-way', comment: 'On site, pit open', actor: { name: 'Tess Tech' } });
    expect((await Ticket.findByPk(ticketId))!.status).toBe('under-way');
  });

  it('refuses moving the due date into the past, and changes nothing', async () => {
    const before = (await Ticket.findByPk(ticketId))!.get({ plain: true });
    for (const dueDate of ['0000-01-01', '2020-01-01']) {
      const res = await sup.patch(`/api/tickets/${ticketId}`, { dueDate, priority: 'low' }).expect(400);
      expect(res.body.error.fields).toEqual([{ field: 'dueDate', message: 'is in the past' }]);
    }
    const far = await sup.patch(`/api/tickets/${ticketId}`, { dueDate: '9999-12-31', priority: 'low' }).expect(400);
    expect(far.body.error.fields).toEqual([{ field: 'dueDate', message: 'is more than five years ahead' }]);
    expect((await Ticket.findByPk(ticketId))!.get({ plain: true })).toEqual(before);
  });

  it('e-mails the assignee when a supervisor changes their ticket, not when they change it themselves', async () => {
    await sup.patch(`/api/tickets/${ticketId}`, { priority: 'urgent', comment: 'Hospital feeder' }).expect(200);
    const mail = await outboxFor(api, 'technician.test@example.com', new RegExp(`^Ticket ${ticketId} changed`));
    expect(mail.body).toContain('priority High → Urgent');
    expect(mail.body).toContain('Comment: Hospital feeder');
    await tech.post(`/api/tickets/${ticketId}/comments`, { comment: 'Need a second pump' }).expect(200);
    const own = await MailJob.findAll({ where: { ticketId, kind: 'ticket-comment' } });
    expect(own.length).toBe(0);
  });

  it('keeps a comment sent with values that are all as they were, and still refuses an empty change', async () => {
    const now = (await sup.get(`/api/tickets/${ticketId}`).expect(200)).body;
    const kept = await sup.patch(`/api/tickets/${ticketId}`, { priority: now.priority, comment: '  Crew booked for Tuesday ' }).expect(200);
    expect(kept.body.priority).toBe(now.priority);
    expect(kept.body.timeline.at(-1)).toMatchObject({ kind: 'comment', comment: 'Crew booked for Tuesday' });
    expect(kept.body.timeline.length).toBe(now.timeline.length + 1);
    const mail = await outboxFor(api, 'technician.test@example.com', new RegExp(`^Ticket ${ticketId}: a comment from`));
    expect(mail.body).toContain('Crew booked for Tuesday');
    const res = await sup.patch(`/api/tickets/${ticketId}`, { priority: now.priority, comment: '   ' }).expect(400);
    expect(res.body.error.code).toBe('nothing_changed');
    expect((await sup.get(`/api/tickets/${ticketId}`).expect(200)).body.timeline.length).toBe(kept.body.timeline.length);
  });

  it('rejects a found position off the route without changing anything', async () => {
    const calibrations = await CableCalibration.count();
    // The route is 200 − 5 = 195 m long; P-7 is at 120 m, so 80 m past it is off the end.
    const res = await tech
      .post(`/api/tickets/${ticketId}/closeout`, { found: { method: 'marker', markerId: await markerId('P-7'), offsetM: 80 }, cause: 'open-conductor', workDone: 'x' })
      .expect(422);
    expect(res.body.error.fields[0].field).toBe('found.offsetM');
    const missing = await tech.post(`/api/tickets/${ticketId}/closeout`, { found: { method: 'distance', fromEnd: 'A' }, cause: 'open-conductor' }).expect(400);
    expect(missing.body.error.fields.map((f: { field: string }) => f.field).sort()).toEqual(['found.distanceM', 'workDone']);
    expect((await Ticket.findByPk(ticketId))!.status).toBe('under-way');
    expect(await TicketCloseout.count()).toBe(0);
    expect(await CableCalibration.count()).toBe(calibrations);
  });

  async function markerId(label: string) {
    const t = (await tech.get(`/api/tickets/${ticketId}`).expect(200)).body as TicketDetail;
    return t.cableRun.markers.find((m) => m.label === label)!.id;
  }

  it('closes out with the found position: located-vs-found error, implied VF, and a calibration for the planners', async () => {
    const res = await tech
      .post(`/api/tickets/${ticketId}/closeout`, {
        found: { method: 'marker', markerId: await markerId('MH-2'), offsetM: 20 },
        cause: 'water-ingress',
        workDone: 'Cut out 2 m, new straight joint',
        comment: 'Backfilled',
      })
      .expect(200);
    const t = res.body as TicketDetail;
    expect(t.status).toBe('fixed');
    const co = t.closeouts[0];
    // Hand-worked: MH-2 is at 80 m of route; 20 m past it is 100 m of route. Both coils (2 + 3 m) come
    // before, so the fault was 105 m of cable from end A.
    expect(co.foundDistanceM).toBeCloseTo(105, 9);
    expect(co.foundChainageM).toBeCloseTo(100, 9);
    expect(co.markerLabel).toBe('MH-2');
    // The reading put it at ≈100 m (the trace was made with the open at 100 m, VF 0.66): error ≈ −5 m.
    expect(co.locatedDistanceM).toBeCloseTo(finding.distanceM, 9);
    expect(co.errorM).toBeCloseTo(finding.distanceM - 105, 9);
    expect(co.errorM).toBeGreaterThan(-5.5);
    expect(co.errorM).toBeLessThan(-4.5);
    // VF = 2·d/(c·t): the 0.66 the trace was made with, scaled by 105/100 = 0.693 (hand-worked).
    expect(co.impliedVf).toBeCloseTo((2 * 105) / (299_792_458 * finding.roundTripNs * 1e-9), 9);
    expect(co.impliedVf!).toBeGreaterThan(0.688);
    expect(co.impliedVf!).toBeLessThan(0.698);
    expect(co.cause).toBe('water-ingress');
    expect(t.timeline.at(-1)).toMatchObject({ kind: 'closeout', fromStatus: 'under-way', toStatus: 'fixed', comment: 'Backfilled' });

    const queue = await (await api.as('planner')).get('/api/calibrations?status=pending').expect(200);
    const cal = queue.body.items.find((c: { id: number }) => c.id === co.calibrationId);
    // It names the ticket whose close-out filed it, for the planner to open.
    expect(cal).toMatchObject({ source: 'repair-closeout', knownLengthM: 105, traceId: t.findings[0].traceId, ticketId, cableType: { id: fx.cable.id } });
    expect(cal.vf).toBeCloseTo(co.impliedVf!, 9);
    expect(cal.roundTripNs).toBeCloseTo(finding.roundTripNs, 9);

    const toSup = await outboxFor(api, 'supervisor.test@example.com', new RegExp(`^Ticket ${ticketId} fixed, waiting for your sign-off`));
    // Rows in the reader's unit and the one precision rule: 105 m → "105.0 m"; located − found about −5 m.
    expect(toSup.body).toMatch(/Found: +105\.0 m along the cable from end A/);
    expect(toSup.body).toMatch(/Located: +\d+\.\d m \(located − found −[45]\.\d\d m\)/);
  });

  it('refuses a second close-out, then signs off, with the whole story on the timeline', async () => {
    await tech.post(`/api/tickets/${ticketId}/closeout`, { found: { method: 'distance', fromEnd: 'A', distanceM: 100 }, cause: 'other', workDone: 'x' }).expect(409);
    await tech.post(`/api/tickets/${ticketId}/status`, { to: 'signed-off' }).expect(403);
    const done = await sup.post(`/api/tickets/${ticketId}/status`, { to: 'signed-off', comment: 'Checked the joint' }).expect(200);
    const t = done.body as TicketDetail;
    expect(t.status).toBe('signed-off');
    expect(t.timeline.map((e) => `${e.kind}:${e.fromStatus ?? ''}→${e.toStatus ?? ''}:${e.actor.name}`)).toEqual([
      'created:→raised:Sol Super',
      'assigned:raised→assigned:Sol Super',
      'status:assigned→under-way:Tess Tech',
      'updated:→:Sol Super',
      'comment:→:Tess Tech',
      'comment:→:Sol Super',
      'closeout:under-way→fixed:Tess Tech',
      'status:fixed→signed-off:Sol Super',
    ]);
    expect(t.timeline[3].changes).toEqual({ priority: ['high', 'urgent'] });
    expect(await TicketEvent.count({ where: { ticketId } })).toBe(8);
    await sup.patch(`/api/tickets/${ticketId}`, { priority: 'low' }).expect(409);
    // Signed off a second time (a double-click, or two supervisors at once): the answer says it already is.
    const twice = await sup.post(`/api/tickets/${ticketId}/status`, { to: 'signed-off' }).expect(409);
    expect(twice.body.error.code).toBe('status_step_not_allowed');
    expect(twice.body.error.message).toBe(`Ticket ${ticketId} is already signed off; nothing was changed.`);
    expect(twice.body.error.fields).toEqual([{ field: 'to', message: 'the ticket is already signed off' }]);
    expect(await TicketEvent.count({ where: { ticketId } })).toBe(8);
  });

  it('answers bad input with a 400 naming the field', async () => {
    const fields = (res: { body: { error: { fields: Array<{ field: string }> } } }) => res.body.error.fields.map((f) => f.field);
    expect(fields(await tech.post(`/api/tickets/${ticketId}/closeout`, { found: {}, cause: 'other', workDone: 'x' }).expect(400))).toEqual(['found.method']);
    expect(fields(await sup.patch(`/api/tickets/${ticketId}`, { assigneeId: 'abc' }).expect(400))).toEqual(['assigneeId']);
    expect(fields(await sup.patch(`/api/tickets/${ticketId}`, { comment: 'only a comment' }).expect(400))).toEqual(['(body)']);
    expect(fields(await tech.post(`/api/tickets/${ticketId}/comments`, { comment: '   ' }).expect(400))).toEqual(['comment']);
    expect(fields(await sup.get('/api/tickets?status=finished').expect(400))).toEqual(['status']);
    await sup.get('/api/tickets/987654').expect(404);
  });

  it('will not file an impossible VF, but closes out without a calibration when told the fault found was another', async () => {
    const f = await confirmedFinding(api, fx.run.id, 150);
    const t = (await sup.post('/api/tickets', { findingIds: [f.id], assigneeId: api.users.technician.id }).expect(201)).body as TicketDetail;
    const calibrations = await CableCalibration.count();
    // 10 m of cable for a reading at ≈150 m implies VF ≈ 0.66 × 10/150 = 0.044, below any cable (hand-worked).
    const refused = await tech.post(`/api/tickets/${t.id}/closeout`, { found: { method: 'distance', fromEnd: 'A', distanceM: 10 }, cause: 'crush-or-kink', workDone: 'Replaced a crushed length' }).expect(422);
    expect(refused.body.error.code).toBe('implied_vf_implausible');
    expect(refused.body.error.fields[0].field).toBe('found');
    expect(refused.body.error.impliedVf).toBeCloseTo((0.66 * 10) / f.distanceM, 2);
    const ok = await tech
      .post(`/api/tickets/${t.id}/closeout`, { found: { method: 'distance', fromEnd: 'A', distanceM: 10 }, cause: 'crush-or-kink', workDone: 'Replaced a crushed length', fileCalibration: false })
      .expect(200);
    expect(ok.body.status).toBe('fixed');
    expect(ok.body.closeouts[0].calibrationId).toBeNull();
    expect(ok.body.closeouts[0].errorM).toBeCloseTo(f.distanceM - 10, 9);
    expect(await CableCalibration.count()).toBe(calibrations);
  });

  it('lists a technician’s own tickets first and a supervisor can filter', async () => {
    const f = await confirmedFinding(api, fx.run.id, 30);
    await sup.post('/api/tickets', { findingIds: [f.id], priority: 'urgent' }).expect(201);
    const mine = (await tech.get('/api/tickets?status=all').expect(200)).body.items as TicketSummary[];
    const firstNotMine = mine.findIndex((t) => !t.mine);
    expect(mine.filter((t) => t.mine).length).toBe(2);
    expect(firstNotMine).toBe(2);
    // The unassigned urgent one is not the technician's, so it comes after theirs despite its priority.
    expect(mine[2]).toMatchObject({ priority: 'urgent', assignee: null, status: 'raised' });
    const open = (await sup.get('/api/tickets').expect(200)).body.items as TicketSummary[];
    expect(open.map((t) => t.status).sort()).toEqual(['fixed', 'raised']);
    const onlyMine = (await tech.get('/api/tickets?status=all&assignee=me').expect(200)).body;
    expect(onlyMine.total).toBe(2);
    const planner = await api.as('planner');
    await planner.get(`/api/tickets/${ticketId}`).expect(200);
    await planner.post('/api/tickets', { findingIds: [f.id] }).expect(403);
  });

  it('frees a withdrawn ticket’s findings, and a reopened repair takes a fresh close-out', async () => {
    const f = await confirmedFinding(api, fx.run.id, 120);
    // The finding names the tickets acting on it, so its page links to one instead of offering another.
    const ticketsOf = async () => (await tech.get(`/api/findings/${f.id}`).expect(200)).body.tickets;
    expect(await ticketsOf()).toEqual([]);
    const first = (await sup.post('/api/tickets', { findingIds: [f.id], assigneeId: api.users.technician.id }).expect(201)).body as TicketDetail;
    expect(await ticketsOf()).toEqual([{ id: first.id, title: first.title, status: 'assigned' }]);
    const gone = await sup.post(`/api/tickets/${first.id}/status`, { to: 'withdrawn', comment: 'Raised twice' }).expect(200);
    expect(gone.body.can).toEqual({ edit: false, moves: [], closeOut: false, comment: false });
    expect(await ticketsOf()).toEqual([]);
    await tech.post(`/api/tickets/${first.id}/status`, { to: 'under-way' }).expect(409);
    const again = (await sup.post('/api/tickets', { findingIds: [f.id], assigneeId: api.users.technician.id }).expect(201)).body as TicketDetail;
    expect(await ticketsOf()).toEqual([{ id: again.id, title: again.title, status: 'assigned' }]);
    const found = (m: number) => ({ found: { method: 'distance', fromEnd: 'A', distanceM: m }, cause: 'open-conductor', workDone: 'Joint' });
    await tech.post(`/api/tickets/${again.id}/closeout`, found(121)).expect(200);
    const reopened = await sup.post(`/api/tickets/${again.id}/status`, { to: 'under-way', comment: 'Still open-circuit' }).expect(200);
    expect(reopened.body.status).toBe('under-way');
    const second = (await tech.post(`/api/tickets/${again.id}/closeout`, found(123)).expect(200)).body as TicketDetail;
    // Newest first: the second dig is the one that counts.
    expect(second.closeouts.map((c) => c.foundDistanceM)).toEqual([123, 121]);
    expect(second.timeline.filter((e) => e.kind === 'closeout').length).toBe(2);
  });
});

describe('ticket e-mail through a relay that refuses at first', () => {
  let relay: TestRelay;
  let api: TestApi;
  beforeAll(async () => {
    relay = await startFlakyRelay(2, /assigned to you/);
    api = await startApi({ smtpUrl: relay.url, mailRetryBaseMs: 40, mailMaxAttempts: 6 });
  });
  afterAll(async () => {
    await api?.close();
    await relay?.close();
  });

  it('keeps the ticket, shows the trouble on it, and delivers on a later try', async () => {
    const fx = await supervisedRun(api, 'Relay run');
    const f = await confirmedFinding(api, fx.run.id, 90);
    const sup = await api.as('supervisor');
    const created = await sup.post('/api/tickets', { findingIds: [f.id], assigneeId: api.users.technician.id }).expect(201);
    const id = created.body.id as number;
    expect(created.body.status).toBe('assigned');
    // Mail details are for those who may read the Outbox (the administrator here), not for the supervisor.
    const admin = await api.as('admin');
    const delivered = await eventually(async () => {
      const t = (await admin.get(`/api/tickets/${id}`).expect(200)).body as TicketDetail;
      return t.mail[0]?.status === 'sent' ? t : undefined;
    }, 'the assignment e-mail delivered');
    expect(((await sup.get(`/api/tickets/${id}`).expect(200)).body as TicketDetail).mail).toEqual([]);
    expect(delivered.mail[0].to).toBe('technician.test@example.com');
    expect(delivered.mail[0].attempts).toBe(3);
    expect(delivered.mail[0].lastError).toContain('Relay busy, try later');
    expect(delivered.mailTrouble).toBe(false);
    expect(relay.refused).toBe(2);
    expect(relay.received.map((m) => m.subject)).toContain(`Ticket ${id} assigned to you: Open conductor on Relay run`);
    expect((await Ticket.findByPk(id))!.assigneeId).toBe(api.users.technician.id);
  });
});

describe('ticket e-mail when the relay is down', () => {
  let api: TestApi;
  beforeAll(async () => {
    api = await startApi({ smtpUrl: `smtp://127.0.0.1:${await closedPort()}`, mailRetryBaseMs: 20, mailMaxAttempts: 2 });
  });
  afterAll(() => api?.close());

  it('commits the assignment and marks the ticket’s mail as not delivered', async () => {
    const fx = await supervisedRun(api, 'Down run');
    const f = await confirmedFinding(api, fx.run.id, 90);
    const sup = await api.as('supervisor');
    const created = await sup.post('/api/tickets', { findingIds: [f.id], assigneeId: api.users.technician.id }).expect(201);
    const id = created.body.id as number;
    const admin = await api.as('admin');
    const failed = await eventually(async () => {
      const t = (await admin.get(`/api/tickets/${id}`).expect(200)).body as TicketDetail;
      return t.mail[0]?.status === 'failed' ? t : undefined;
    }, 'the assignment e-mail marked failed');
    // The supervisor sees that an e-mail failed, not to whom or why.
    const supView = (await sup.get(`/api/tickets/${id}`).expect(200)).body as TicketDetail;
    expect(supView.mailTrouble).toBe(true);
    expect(supView.mail).toEqual([]);
    expect(failed.mailTrouble).toBe(true);
    expect(failed.mail[0]).toMatchObject({ kind: 'ticket-assigned', attempts: 2, to: 'technician.test@example.com' });
    expect(failed.mail[0].lastError).toMatch(/ECONNREFUSED|connect/i);
    expect(failed.status).toBe('assigned');
    const list = (await sup.get('/api/tickets').expect(200)).body.items as TicketSummary[];
    expect(list.find((t) => t.id === id)?.mailTrouble).toBe(true);
  });
});
