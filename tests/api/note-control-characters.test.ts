import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Finding, Site, Ticket, TicketEvent, Trace } from '../../server/db/models';
import { makeRun, stepTraceCsv } from './support/field-fixtures';
import { startApi, type TestApi } from './support/api';
import { confirmedFinding, supervisedRun } from './tickets.support';

// Notes, comments and reasons keep their line breaks and tabs, but took every other control character as well: a
// bell (U+0007), a backspace (U+0008) or an escape (U+001B, the start of a terminal sequence) pasted or sent by a
// hostile client was stored and then shown in lists, crew sheets and plain-text e-mails, where it shows as nothing, a
// box, or rewrites what is on the screen. One-line fields already refused them; these must refuse them too, by name.

let api: TestApi;
beforeAll(async () => {
  api = await startApi();
});
afterAll(() => api.close());

type Res = { status: number; body: { error: { code: string; message: string; fields: Array<{ field: string; message: string }> } } };
function expectControl(res: Res, field: string, code: string, at: number) {
  expect(res.status).toBe(400);
  expect(res.body.error.code).toBe('invalid_input');
  expect(res.body.error.fields).toContainEqual({ field, message: `must not contain control characters (${code} at character ${at}); only line breaks and tabs are kept` });
}

describe('control characters in notes, comments and reasons', () => {
  it('are refused in a finding note, naming the field and the character, and no finding is made', async () => {
    const fx = await makeRun('Control note run');
    const tech = await api.as('technician');
    const up = await tech
      .postRaw('/api/traces')
      .field('cableRunId', String(fx.run.id))
      .field('end', 'A')
      .attach('file', Buffer.from(stepTraceCsv({ faultM: 90, vf: 0.66 })), 'control-note.csv')
      .expect(201);
    const traceId = up.body.traces[0].id as number;
    const before = await Finding.count();
    const res = await tech.post('/api/findings', { traceId, eventIndex: 0, status: 'confirmed', kind: 'open-conductor', note: 'by the kerb\u001b[2Jgone' });
    expectControl(res, 'note', 'U+001B', 12);
    expect(await Finding.count()).toBe(before);
    // Line breaks (LF and CR LF) and tabs are kept as they were written.
    const ok = await tech.post('/api/findings', { traceId, eventIndex: 0, status: 'confirmed', kind: 'open-conductor', note: 'by the kerb\r\npit 3\tnorth side\nsecond line' }).expect(201);
    expect(ok.body.note).toBe('by the kerb\r\npit 3\tnorth side\nsecond line');
  });

  it('are refused in a ticket’s notes, a comment and a close-out’s work done, and nothing is recorded', async () => {
    const fx = await supervisedRun(api, 'Control ticket run');
    const finding = await confirmedFinding(api, fx.run.id, 110);
    const sup = await api.as('supervisor');
    const tickets = await Ticket.count();
    expectControl(await sup.post('/api/tickets', { findingIds: [finding.id], notes: 'dig\u0007here' }), 'notes', 'U+0007', 4);
    expect(await Ticket.count()).toBe(tickets);
    const ticket = (await sup.post('/api/tickets', { findingIds: [finding.id], assigneeId: api.users.technician.id, notes: 'dig\there\nmind the main' }).expect(201)).body;
    const events = await TicketEvent.count({ where: { ticketId: ticket.id } });
    expectControl(await sup.post(`/api/tickets/${ticket.id}/comments`, { comment: 'call \u0085first' }), 'comment', 'U+0085', 6);
    expectControl(await sup.patch(`/api/tickets/${ticket.id}`, { priority: 'high', comment: 'sooner\u0008' }), 'comment', 'U+0008', 7);
    const tech = await api.as('technician');
    expectControl(
      await tech.post(`/api/tickets/${ticket.id}/closeout`, { found: { method: 'distance', fromEnd: 'A', distanceM: 108 }, cause: 'open-conductor', workDone: 'Jointed\u007f the pair' }),
      'workDone',
      'U+007F',
      8,
    );
    const now = (await Ticket.findByPk(ticket.id))!;
    expect([now.status, now.priority]).toEqual(['assigned', 'normal']);
    expect(await TicketEvent.count({ where: { ticketId: ticket.id } })).toBe(events);
  });

  it('are refused in a site’s access notes and a trace’s archive reason', async () => {
    const sup = await api.as('supervisor');
    expectControl(await sup.post('/api/sites', { name: 'Control site', accessNotes: 'gate code\u000c4471' }), 'accessNotes', 'U+000C', 10);
    expect(await Site.count({ where: { name: 'Control site' } })).toBe(0);

    const fx = await makeRun('Control archive run');
    const tech = await api.as('technician');
    const up = await tech
      .postRaw('/api/traces')
      .field('cableRunId', String(fx.run.id))
      .field('end', 'A')
      .attach('file', Buffer.from(stepTraceCsv({ faultM: 70, vf: 0.66 })), 'control-archive.csv')
      .expect(201);
    const id = up.body.traces[0].id as number;
    expectControl(await tech.post(`/api/traces/${id}/archive`, { reason: 'wrong\u0001 pair' }), 'reason', 'U+0001', 6);
    expect((await Trace.findByPk(id))!.archivedAt).toBeNull();
  });

  it('are refused in the reason for a velocity-factor override on an upload form, and nothing is stored', async () => {
    const fx = await makeRun('Control override run');
    const tech = await api.as('technician');
    const before = await Trace.count();
    const res = await tech
      .postRaw('/api/traces')
      .field('cableRunId', String(fx.run.id))
      .field('end', 'A')
      .field('vfOverride', '0.7')
      .field('vfOverrideReason', 'measured\u001b on a known length')
      .attach('file', Buffer.from(stepTraceCsv({ faultM: 60, vf: 0.66 })), 'control-override.csv');
    expectControl(res, 'vfOverrideReason', 'U+001B', 9);
    expect(await Trace.count()).toBe(before);
  });

  it('are refused in a cable-library change reason and notes', async () => {
    const planner = await api.as('planner');
    const fx = await makeRun('Control cable run');
    const res = await planner.patch(`/api/cables/${fx.cable.id}`, { notes: 'checked\u0007', reason: 'yard check' });
    expectControl(res, 'notes', 'U+0007', 8);
    expectControl(await planner.patch(`/api/cables/${fx.cable.id}`, { notes: 'checked', reason: 'yard\u001f check' }), 'reason', 'U+001F', 5);
  });
});
