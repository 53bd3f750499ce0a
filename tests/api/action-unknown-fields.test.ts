import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { CableCalibration, Ticket } from '../../server/db/models';
import { startApi, type TestApi } from './support/api';
import { confirmedFinding, supervisedRun } from './tickets.support';

// An action (create a ticket, close one out, record a finding…) names a field the server does not take: a slip such
// as fileCalibrations for fileCalibration, or asigneeId. Dropped without a word, the action went ahead on the default
// (a calibration filed that the crew said not to file, a ticket left unassigned) and the answer was 2xx.

let api: TestApi;

beforeAll(async () => {
  api = await startApi();
});
afterAll(() => api.close());

type Res = { status: number; body: { error: { code: string; fields: Array<{ field: string; message: string }> } } };
function expectNamed(res: Res, field: string) {
  expect(res.status).toBe(400);
  expect(res.body.error.code).toBe('invalid_input');
  expect(res.body.error.fields).toContainEqual({ field, message: 'is not expected here' });
}

describe('an action naming a field the server does not take', () => {
  it('is refused for a new ticket, and no ticket is made', async () => {
    const fx = await supervisedRun(api, 'Unknown fields ticket run');
    const finding = await confirmedFinding(api, fx.run.id, 120);
    const sup = await api.as('supervisor');
    const before = await Ticket.count();
    expectNamed(await sup.post('/api/tickets', { findingIds: [finding.id], asigneeId: api.users.technician.id }), 'asigneeId');
    expect(await Ticket.count()).toBe(before);
  });

  it('is refused for a close-out, and neither the close-out nor a calibration is recorded', async () => {
    const fx = await supervisedRun(api, 'Unknown fields closeout run');
    const finding = await confirmedFinding(api, fx.run.id, 110);
    const sup = await api.as('supervisor');
    const ticket = (await sup.post('/api/tickets', { findingIds: [finding.id], assigneeId: api.users.technician.id }).expect(201)).body;
    const tech = await api.as('technician');
    const calibrations = await CableCalibration.count();
    const res = await tech.post(`/api/tickets/${ticket.id}/closeout`, {
      found: { method: 'distance', fromEnd: 'A', distanceM: 118 },
      cause: 'open-conductor',
      workDone: 'Jointed the open pair in the pit',
      fileCalibrations: false,
    });
    expectNamed(res, 'fileCalibrations');
    expect((await Ticket.findByPk(ticket.id))!.status).toBe('assigned');
    expect(await CableCalibration.count()).toBe(calibrations);
    // A slip inside the found position is named with its path.
    expectNamed(
      await tech.post(`/api/tickets/${ticket.id}/closeout`, { found: { method: 'distance', fromEnd: 'A', distanceM: 118, offsetM: 3 }, cause: 'open-conductor', workDone: 'x' }),
      'found.offsetM',
    );
  });

  it('is refused for a finding, a status step and a comment', async () => {
    const fx = await supervisedRun(api, 'Unknown fields finding run');
    const finding = await confirmedFinding(api, fx.run.id, 90);
    const tech = await api.as('technician');
    expectNamed(await tech.post('/api/findings', { traceId: (finding as unknown as { traceId: number }).traceId, eventIndex: 0, status: 'confirmed', kind: 'open-conductor', notes: 'x' }), 'notes');
    const sup = await api.as('supervisor');
    const ticket = (await sup.post('/api/tickets', { findingIds: [finding.id], assigneeId: api.users.technician.id }).expect(201)).body;
    expectNamed(await tech.post(`/api/tickets/${ticket.id}/status`, { to: 'under-way', coment: 'on site' }), 'coment');
    expectNamed(await tech.post(`/api/tickets/${ticket.id}/comments`, { comment: 'on site', urgent: true }), 'urgent');
    expect((await Ticket.findByPk(ticket.id))!.status).toBe('assigned');
  });

  it('names ten of a body of thousands of unknown fields and counts the rest, in an answer of a few hundred bytes', async () => {
    const sup = await api.as('supervisor');
    const body: Record<string, number> = { findingIds: 1 } as unknown as Record<string, number>;
    for (let i = 0; i < 5000; i++) body[`k${i}`] = 1;
    const res = await sup.post('/api/tickets', body);
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('invalid_input');
    const unknown = (res.body.error.fields as Array<{ field: string; message: string }>).filter((f) => f.field !== 'findingIds');
    expect(unknown.slice(0, 10)).toEqual(Array.from({ length: 10 }, (_, i) => ({ field: `k${i}`, message: 'is not expected here' })));
    expect(unknown[10]).toEqual({ field: '(body)', message: 'and 4990 more fields not expected here' });
    expect(unknown).toHaveLength(11);
    expect(res.text.length).toBeLessThan(2000);
  });
});
