import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { CableType } from '../../server/db/models';
import { startApi, type TestApi } from './support/api';

let api: TestApi;
let cableTypeId: number;

beforeAll(async () => {
  api = await startApi();
  cableTypeId = (
    await CableType.create({
      name: 'Sites test pair',
      construction: 'twisted-pair',
      dielectric: 'PE',
      z0Ohm: 100,
      vf: 0.66,
      vfTolerance: 0.03,
      attenuationDbPer100m: null,
      attenuationFreqMhz: null,
      vfSource: 'handbook',
      vfReference: 'test',
      notes: null,
    })
  ).id;
});
afterAll(() => api.close());

describe('sites and cable runs', () => {
  it('lets a supervisor create a site with supervisors, a run and its markers; a technician only reads', async () => {
    const sup = await api.as('supervisor');
    const tech = await api.as('technician');
    await tech.post('/api/sites', { name: 'Nope' }).expect(403);
    const site = (
      await sup.post('/api/sites', { name: 'Brookfold pumping station', address: '4 Mill Lane', supervisorIds: [api.users.supervisor.id] }).expect(201)
    ).body;
    expect(site.supervisors.map((s: { email: string }) => s.email)).toEqual(['supervisor.test@example.com']);
    const dup = await sup.post('/api/sites', { name: 'Brookfold pumping station' }).expect(409);
    expect(dup.body.error.fields[0].field).toBe('name');
    // The same name in other letters' case is the same place to a reader; renaming another site to it is refused too.
    const caseDup = await sup.post('/api/sites', { name: 'BROOKFOLD Pumping Station' }).expect(409);
    expect(caseDup.body.error.message).toBe('There is already a site called "BROOKFOLD Pumping Station" (as "Brookfold pumping station").');
    const other = (await sup.post('/api/sites', { name: 'Millrace weir' }).expect(201)).body;
    await sup.put(`/api/sites/${other.id}`, { name: 'brookfold pumping station' }).expect(409);
    // A site may change the case of its own name.
    expect((await sup.put(`/api/sites/${other.id}`, { name: 'Millrace Weir' }).expect(200)).body.name).toBe('Millrace Weir');
    const notSup = await sup.post('/api/sites', { name: 'Other', supervisorIds: [api.users.technician.id] }).expect(422);
    expect(notSup.body.error.fields[0].field).toBe('supervisorIds');

    const run = (
      await sup
        .post('/api/cable-runs', { siteId: site.id, name: 'Feeder 2', cableTypeId, endALabel: 'Panel', endBLabel: 'Pump house', installedLengthM: 300 })
        .expect(201)
    ).body;
    expect(run.cableType.vf).toBe(0.66);
    const saved = await sup
      .put(`/api/cable-runs/${run.id}/markers`, {
        markers: [
          { label: 'HH-2', kind: 'handhole', chainageM: 150, slackM: 4 },
          { label: 'HH-1', kind: 'handhole', chainageM: 60, slackM: 2 },
        ],
      })
      .expect(200);
    expect(saved.body.markers.map((m: { label: string }) => m.label)).toEqual(['HH-1', 'HH-2']);
    // 300 m of cable less 6 m of slack leaves a 294 m route; a marker at 296 m is off the end.
    const off = await sup.put(`/api/cable-runs/${run.id}/markers`, { markers: [{ label: 'X', kind: 'pole', chainageM: 296, slackM: 6 }] }).expect(422);
    expect(off.body.error.fields[0].field).toBe('markers.0.chainageM');
    const bad = await sup.put(`/api/cable-runs/${run.id}/markers`, { markers: [{ label: 'X', kind: 'spaceship', chainageM: -1 }] }).expect(400);
    expect(bad.body.error.fields.map((f: { field: string }) => f.field).sort()).toEqual(['markers.0.chainageM', 'markers.0.kind']);
    const read = await tech.get(`/api/cable-runs/${run.id}`).expect(200);
    expect(read.body.markers).toHaveLength(2);
    const list = await tech.get(`/api/sites?q=brookfold`).expect(200);
    expect(list.body.items[0].cableRunCount).toBe(1);
  });
});
