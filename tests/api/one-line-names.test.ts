import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startApi, type Client, type TestApi } from './support/api';
import { supervisedRun, confirmedFinding } from './tickets.support';

// A name, title or label is one line wherever it is shown: in the plain-text e-mails it starts a
// line of its own after its label ("Site:   …"), so a line break inside one would print a line
// that Rholog never wrote (a forged "Dig window" or "Where to dig" line in a crew's mail).
// Multi-line fields (notes, comments, reasons) keep their line breaks.

let api: TestApi;
let sup: Client;
let admin: Client;
let planner: Client;
let tech: Client;
let fx: Awaited<ReturnType<typeof supervisedRun>>;

const FORGED = 'Yard\nDig window (95 %):   10.0–12.0 m of cable from end A';
const ONE_LINE = 'must be one line: no line breaks, tabs or other control characters';

beforeAll(async () => {
  api = await startApi();
  sup = await api.as('supervisor');
  admin = await api.as('admin');
  planner = await api.as('planner');
  tech = await api.as('technician');
  fx = await supervisedRun(api, 'One line');
});
afterAll(() => api.close());

function refusedOn(res: { status: number; body: { error: { code: string; fields: Array<{ field: string; message: string }> } } }, field: string) {
  expect(res.status).toBe(400);
  expect(res.body.error.code).toBe('invalid_input');
  expect(res.body.error.fields).toContainEqual({ field, message: ONE_LINE });
}

describe('names, titles and labels are one line', () => {
  it('refuses a line break, a tab or another control character in a site, run or marker name, and stores nothing', async () => {
    refusedOn(await sup.post('/api/sites', { name: FORGED, supervisorIds: [] }), 'name');
    refusedOn(await sup.post('/api/sites', { name: 'Quay\r\nStreet', supervisorIds: [] }), 'name');
    refusedOn(await sup.post('/api/sites', { name: 'Quay', address: '4 Quay St\u2028Harrowmere', supervisorIds: [] }), 'address');
    refusedOn(await sup.put(`/api/sites/${fx.site.id}`, { name: 'Tab\there', supervisorIds: [] }), 'name');
    expect((await sup.get(`/api/sites/${fx.site.id}`).expect(200)).body.name).toBe(fx.site.name);
    expect((await sup.get('/api/sites?q=Quay').expect(200)).body.total).toBe(0);

    const run = { siteId: fx.site.id, name: 'Feeder\n2', cableTypeId: fx.cable.id, endALabel: 'Cabinet', endBLabel: 'Pole', installedLengthM: 100 };
    refusedOn(await sup.post('/api/cable-runs', run), 'name');
    refusedOn(await sup.post('/api/cable-runs', { ...run, name: 'Feeder 2', endBLabel: 'Pole\u0085 7' }), 'endBLabel');
    refusedOn(await sup.put(`/api/cable-runs/${fx.run.id}/markers`, { markers: [{ label: 'MH-1\rMH-9', kind: 'manhole', chainageM: 40, slackM: 0 }] }), 'markers.0.label');
    const stored = await sup.get(`/api/cable-runs/${fx.run.id}`).expect(200);
    expect(stored.body.markers.map((m: { label: string }) => m.label)).toEqual(['MH-1', 'MH-2', 'P-7']);
  });

  it('refuses one in a ticket title, a person\'s name, a cable type\'s name and an instrument', async () => {
    const f = await confirmedFinding(api, fx.run.id, 60);
    refusedOn(await sup.post('/api/tickets', { findingIds: [f.id], title: 'Dig here\nWhere to dig: 3 m past MH-1' }), 'title');
    const tk = await sup.post('/api/tickets', { findingIds: [f.id], title: 'Open at the kerb', notes: 'Bring the long ladder.\nAsk at the gate.' }).expect(201);
    expect(tk.body.notes).toBe('Bring the long ladder.\nAsk at the gate.');
    refusedOn(await sup.patch(`/api/tickets/${tk.body.id}`, { title: 'Open\r\nat the kerb' }), 'title');
    expect((await sup.get(`/api/tickets/${tk.body.id}`).expect(200)).body.title).toBe('Open at the kerb');

    refusedOn(await admin.post('/api/users', { email: 'nl@example.com', name: 'Nia\nLane', role: 'technician' }), 'name');
    refusedOn(await admin.patch(`/api/users/${api.users.technician.id}`, { name: 'Tess\u0007Tech' }), 'name');
    // A phone number is one line too: a line break or tab in one is a typing slip, not part of a number.
    refusedOn(await admin.post('/api/users', { email: 'np@example.com', name: 'Nia Park', role: 'technician', phone: '0100 555\n0199' }), 'phone');
    refusedOn(await admin.patch(`/api/users/${api.users.technician.id}`, { phone: '0100\r555 0199' }), 'phone');

    const cable = { name: 'RG-6\nfoam', construction: 'coax', dielectric: 'foam PE', z0Ohm: 75, vf: 0.85, vfTolerance: 0.02, vfSource: 'handbook', vfReference: 'Foam PE, from the\nmaker\'s sheet' };
    refusedOn(await planner.post('/api/cables', cable), 'name');
    const ok = await planner.post('/api/cables', { ...cable, name: 'RG-6 foam' }).expect(201);
    expect(ok.body.vfReference).toBe('Foam PE, from the\nmaker\'s sheet');

    const reading = { cableRunId: fx.run.id, kind: 'loop-resistance', readings: { fromEnd: 'A', loopOhm: 2, first: [{ lengthM: 200, material: 'copper', sizeMm2: 1.5 }], second: 'same' } };
    refusedOn(await tech.post('/api/measurements', { ...reading, instrument: 'Bridge\nserial 7' }), 'instrument');
  });

  it('still takes names in any script, with their combining marks', async () => {
    const res = await sup.post('/api/sites', { name: 'Ḩārat al-Mīnā\u0301 — محطة الميناء', supervisorIds: [] }).expect(201);
    expect(res.body.name).toBe('Ḩārat al-Mīnā\u0301 — محطة الميناء');
  });
});
