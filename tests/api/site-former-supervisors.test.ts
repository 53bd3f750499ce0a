import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { MailJob, SiteSupervisor, User } from '../../server/db/models';
import { makeRun, stepTraceCsv } from './support/field-fixtures';
import { startApi, TEST_PASSWORD, type Client, type TestApi } from './support/api';
import { hashPassword } from '../../server/auth/passwords';

let api: TestApi;
let admin: Client;
let planner: Client;

beforeAll(async () => {
  api = await startApi();
  admin = await api.as('admin');
  planner = await api.as('planner');
});
afterAll(() => api.close());

async function extraSupervisor(email: string) {
  const u = await User.create({ email, name: `Supervisor ${email.split('@')[0]}`, role: 'supervisor', passwordHash: await hashPassword(TEST_PASSWORD) });
  return u.id;
}

describe('a site whose supervisor was deactivated or moved to another role', () => {
  it('is still saved as the edit form sends it (the same supervisor list), and the view says who is no longer a supervisor', async () => {
    const leaving = await extraSupervisor('leaving.sup@example.com');
    const site = (
      await planner.post('/api/sites', { name: 'Kestrel Row cabinet yard', supervisorIds: [api.users.supervisor.id, leaving] }).expect(201)
    ).body;
    await admin.patch(`/api/users/${leaving}`, { active: false }).expect(200);

    const shown = (await planner.get(`/api/sites/${site.id}`).expect(200)).body;
    const former = shown.supervisors.find((s: { id: number }) => s.id === leaving);
    expect(former).toMatchObject({ id: leaving, active: false });
    expect(shown.supervisors.find((s: { id: number }) => s.id === api.users.supervisor.id)).toMatchObject({ active: true });

    // The form sends back the list it loaded with a new address: the link that was already there is kept as it is.
    const saved = await planner
      .put(`/api/sites/${site.id}`, { name: 'Kestrel Row cabinet yard', address: '12 Kestrel Row', supervisorIds: shown.supervisors.map((s: { id: number }) => s.id) })
      .expect(200);
    expect(saved.body.address).toBe('12 Kestrel Row');
    expect(saved.body.supervisors.map((s: { id: number }) => s.id).sort()).toEqual([api.users.supervisor.id, leaving].sort());

    // Taking the former supervisor off works, and they cannot be put back while deactivated.
    const off = await planner.put(`/api/sites/${site.id}`, { name: 'Kestrel Row cabinet yard', supervisorIds: [api.users.supervisor.id] }).expect(200);
    expect(off.body.supervisors.map((s: { id: number }) => s.id)).toEqual([api.users.supervisor.id]);
    const back = await planner.put(`/api/sites/${site.id}`, { name: 'Kestrel Row cabinet yard', supervisorIds: [api.users.supervisor.id, leaving] }).expect(422);
    expect(back.body.error.fields[0]).toMatchObject({ field: 'supervisorIds' });
  });

  it('keeps a supervisor who became a technician linked until someone takes them off, and refuses adding one', async () => {
    const moved = await extraSupervisor('moved.sup@example.com');
    const site = (await planner.post('/api/sites', { name: 'Otterbank pumping station', supervisorIds: [moved] }).expect(201)).body;
    await admin.patch(`/api/users/${moved}`, { role: 'technician' }).expect(200);
    expect((await planner.get(`/api/sites/${site.id}`).expect(200)).body.supervisors).toEqual([expect.objectContaining({ id: moved, active: false })]);
    await planner.put(`/api/sites/${site.id}`, { name: 'Otterbank pumping station', accessNotes: 'Gate code from control', supervisorIds: [moved] }).expect(200);
    const other = (await planner.post('/api/sites', { name: 'Otterbank weir' }).expect(201)).body;
    const refused = await planner.put(`/api/sites/${other.id}`, { name: 'Otterbank weir', supervisorIds: [moved] }).expect(422);
    expect(refused.body.error.code).toBe('not_a_supervisor');
  });

  it('sends a confirmed finding to the site’s current supervisors only, not to one who became a technician', async () => {
    const moved = await extraSupervisor('moved.mail@example.com');
    const fx = await makeRun('Former supervisor mail run');
    await SiteSupervisor.bulkCreate([
      { siteId: fx.site.id, userId: moved },
      { siteId: fx.site.id, userId: api.users.supervisor.id },
    ]);
    await admin.patch(`/api/users/${moved}`, { role: 'technician' }).expect(200);
    const tech = await api.as('technician');
    const up = await tech.postRaw('/api/traces').field('cableRunId', String(fx.run.id)).field('end', 'A').attach('file', Buffer.from(stepTraceCsv({ faultM: 90, vf: 0.66 })), 'former.csv').expect(201);
    const f = await tech.post('/api/findings', { traceId: up.body.traces[0].id, eventIndex: 0, status: 'confirmed', kind: 'open-conductor' }).expect(201);
    const job = await MailJob.findOne({ where: { findingId: f.body.id, kind: 'finding-confirmed' } });
    expect(job!.toAddresses).toContain(api.users.supervisor.email);
    expect(job!.toAddresses).not.toContain('moved.mail@example.com');
  });
});
