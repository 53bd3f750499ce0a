import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { hashPassword } from '../../server/auth/passwords';
import { User } from '../../server/db/models';
import { startApi, TEST_PASSWORD, type Client, type TestApi } from './support/api';
import { makeRun } from './support/field-fixtures';

// Two planners open the same site, run or route in their forms; both save. The forms send every field (PUT) and,
// with it, what they loaded (basedOn). A field only one of them changed must survive the other's save.

let api: TestApi;
let a: Client;
let b: Client;
let second: number;

beforeAll(async () => {
  api = await startApi();
  a = await api.as('planner');
  const other = await User.create({ email: 'planner2.test@example.com', name: 'Pia Plan', role: 'planner', passwordHash: await hashPassword(TEST_PASSWORD) });
  b = await api.signIn(other.email, TEST_PASSWORD);
  second = (await User.create({ email: 'sup2.test@example.com', name: 'Sam Super', role: 'supervisor', passwordHash: await hashPassword(TEST_PASSWORD) })).id;
});
afterAll(() => api.close());

const siteForm = (s: { name: string; address: string | null; latitude: number | null; longitude: number | null; accessNotes: string | null; supervisors: Array<{ id: number }> }) => ({
  name: s.name,
  address: s.address,
  latitude: s.latitude,
  longitude: s.longitude,
  accessNotes: s.accessNotes,
  supervisorIds: s.supervisors.map((u) => u.id),
});

describe('two planners saving the same site', () => {
  it('keeps the supervisor one added when the other saves a new address from the form as it was loaded', async () => {
    const created = (await a.post('/api/sites', { name: 'Linnet Hill depot', supervisorIds: [api.users.supervisor.id] }).expect(201)).body;
    const loadedA = (await a.get(`/api/sites/${created.id}`).expect(200)).body;
    const loadedB = (await b.get(`/api/sites/${created.id}`).expect(200)).body;

    await a.put(`/api/sites/${created.id}`, { ...siteForm(loadedA), supervisorIds: [api.users.supervisor.id, second], basedOn: siteForm(loadedA) }).expect(200);
    const saved = await b.put(`/api/sites/${created.id}`, { ...siteForm(loadedB), address: '3 Linnet Hill', basedOn: siteForm(loadedB) }).expect(200);

    expect(saved.body.address).toBe('3 Linnet Hill');
    expect(saved.body.supervisors.map((u: { id: number }) => u.id).sort()).toEqual([api.users.supervisor.id, second].sort());
  });

  it('refuses, naming the field and its value now, a change to a field the other changed too; nothing is saved', async () => {
    const created = (await a.post('/api/sites', { name: 'Whinchat sidings', accessNotes: 'Gate A' }).expect(201)).body;
    const loaded = (await a.get(`/api/sites/${created.id}`).expect(200)).body;
    await a.put(`/api/sites/${created.id}`, { ...siteForm(loaded), accessNotes: 'Gate B, code 4471', basedOn: siteForm(loaded) }).expect(200);
    const refused = await b
      .put(`/api/sites/${created.id}`, { ...siteForm(loaded), address: '1 Sidings Road', accessNotes: 'Gate A (padlocked)', basedOn: siteForm(loaded) })
      .expect(409);
    expect(refused.body.error.code).toBe('changed_meanwhile');
    expect(refused.body.error.fields).toEqual([{ field: 'accessNotes', message: 'was changed by someone else: it is now "Gate B, code 4471"; you started from "Gate A"' }]);
    const now = (await a.get(`/api/sites/${created.id}`).expect(200)).body;
    expect(now).toMatchObject({ address: null, accessNotes: 'Gate B, code 4471' });
  });
});

describe('two planners saving the same cable run', () => {
  it('keeps the length one corrected when the other renames end B from the form as it was loaded', async () => {
    const { run } = await makeRun('Overlap run');
    const loaded = (await a.get(`/api/cable-runs/${run.id}`).expect(200)).body;
    const form = { name: loaded.name, cableTypeId: loaded.cableTypeId, endALabel: loaded.endALabel, endBLabel: loaded.endBLabel, installedLengthM: loaded.installedLengthM, notes: loaded.notes };
    await a.put(`/api/cable-runs/${run.id}`, { ...form, installedLengthM: 212, basedOn: form }).expect(200);
    const saved = await b.put(`/api/cable-runs/${run.id}`, { ...form, endBLabel: 'Pole 14A', basedOn: form }).expect(200);
    expect(saved.body).toMatchObject({ installedLengthM: 212, endBLabel: 'Pole 14A' });
    const refused = await b.put(`/api/cable-runs/${run.id}`, { ...form, installedLengthM: 205, basedOn: form }).expect(409);
    expect(refused.body.error.fields.map((f: { field: string }) => f.field)).toEqual(['installedLengthM']);
    expect((await a.get(`/api/cable-runs/${run.id}`).expect(200)).body.installedLengthM).toBe(212);
  });
});

describe('two planners saving the same route', () => {
  it('refuses a marker list edited from the list as it was before the other saved, and keeps theirs', async () => {
    const { run } = await makeRun('Overlap route');
    const loaded = (await a.get(`/api/cable-runs/${run.id}`).expect(200)).body;
    const strip = (ms: Array<Record<string, unknown>>) => ms.map(({ id: _id, ...m }) => m);
    const theirs = [...strip(loaded.markers), { label: 'HH-9', kind: 'handhole', chainageM: 150, slackM: 0 }];
    await a.put(`/api/cable-runs/${run.id}/markers`, { markers: theirs, basedOn: { markers: loaded.markers } }).expect(200);

    const mine = strip(loaded.markers).map((m) => (m.label === 'MH-1' ? { ...m, notes: 'Lid seized' } : m));
    const refused = await b.put(`/api/cable-runs/${run.id}/markers`, { markers: mine, basedOn: { markers: loaded.markers } }).expect(409);
    expect(refused.body.error).toMatchObject({ code: 'changed_meanwhile', fields: [{ field: 'markers' }] });
    const now = (await a.get(`/api/cable-runs/${run.id}`).expect(200)).body;
    expect(now.markers.map((m: { label: string }) => m.label)).toContain('HH-9');

    // Started again from the list now stored, the change is saved; saving what is already stored passes too.
    const again = [...strip(now.markers).map((m) => (m.label === 'MH-1' ? { ...m, notes: 'Lid seized' } : m))];
    const saved = await b.put(`/api/cable-runs/${run.id}/markers`, { markers: again, basedOn: { markers: now.markers } }).expect(200);
    expect(saved.body.markers.find((m: { label: string }) => m.label === 'MH-1').notes).toBe('Lid seized');
    await b.put(`/api/cable-runs/${run.id}/markers`, { markers: again, basedOn: { markers: now.markers } }).expect(200);
  });
});
