import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ROLES } from '../../shared/auth/permissions';
import { cableTypeVersion, changesSince } from '../../server/cables/cables.service';
import { startApi, type Client, type TestApi } from './support/api';
import { solidPeCoax } from './support/cables';

let api: TestApi;
let planner: Client;
beforeAll(async () => {
  api = await startApi();
  planner = await api.as('planner');
});
afterAll(() => api.close());

const solidPe = solidPeCoax;

describe('permissions on /api/cables', () => {
  it('lets every role read and search, and only planners and admins create and edit', async () => {
    const created = await planner.post('/api/cables', solidPe('Perm check coax')).expect(201);
    const id = created.body.id as number;
    const expectWrite: Record<string, number> = { technician: 403, supervisor: 403, planner: 200, admin: 200 };
    for (const role of ROLES) {
      const c = await api.as(role);
      const list = await c.get('/api/cables?q=perm').expect(200);
      expect(list.body.items.map((i: { name: string }) => i.name)).toContain('Perm check coax');
      await c.get(`/api/cables/${id}`).expect(200);
      await c.get(`/api/cables/${id}/history`).expect(200);
      const res = await c.patch(`/api/cables/${id}`, { notes: `seen by ${role}`, reason: 'permission check' });
      expect(res.status).toBe(expectWrite[role]);
      if (res.status === 403) expect(res.body.error.code).toBe('forbidden');
      const create = await c.post('/api/cables', solidPe(`By ${role}`));
      expect(create.status).toBe(expectWrite[role] === 200 ? 201 : 403);
    }
    const anon = await api.anonymous();
    await anon.get('/api/cables').expect(401);
  });
});

describe('POST /api/cables validation', () => {
  it('rejects a VF outside (0, 1] with a field message', async () => {
    for (const vf of [0, -0.2, 1.01, 66]) {
      const res = await planner.post('/api/cables', solidPe(`Bad VF ${vf}`, { vf })).expect(400);
      expect(res.body.error.code).toBe('invalid_input');
      expect(res.body.error.fields.map((f: { field: string }) => f.field)).toEqual(['vf']);
    }
    const one = await planner.post('/api/cables', solidPe('Vacuum-like line', { vf: 1, vfTolerance: 0 })).expect(201);
    expect(one.body.vf).toBe(1);
  });

  it('rejects a negative impedance and a missing source, naming each field', async () => {
    const res = await planner.post('/api/cables', { ...solidPe('Two faults', { z0Ohm: -50 }), vfSource: undefined }).expect(400);
    const fields = Object.fromEntries(res.body.error.fields.map((f: { field: string; message: string }) => [f.field, f.message]));
    expect(fields.z0Ohm).toBe('must be greater than 0 Ω');
    expect(fields.vfSource).toMatch(/^is required/);
    const noRef = await planner.post('/api/cables', solidPe('No reference', { vfReference: '  ' })).expect(400);
    expect(noRef.body.error.fields[0]).toMatchObject({ field: 'vfReference' });
  });

  it('wants attenuation and its frequency together', async () => {
    const res = await planner.post('/api/cables', solidPe('Half attenuation', { attenuationDbPer100m: 4.6 })).expect(400);
    expect(res.body.error.fields).toEqual([{ field: 'attenuationFreqMhz', message: 'is required with an attenuation' }]);
  });

  it('refuses a second entry of the same name, whatever the letter case', async () => {
    await planner.post('/api/cables', solidPe('Unique name coax')).expect(201);
    const res = await planner.post('/api/cables', solidPe('UNIQUE name COAX')).expect(409);
    expect(res.body.error.fields).toEqual([{ field: 'name', message: 'is already in the library' }]);
  });

  it('folds the case of every script, not only ASCII, and refuses two entries of one name made at once', async () => {
    await planner.post('/api/cables', solidPe('Foam feeder, 75 Ω')).expect(201);
    // "ω" is the lower case of "Ω"; SQLite's lower() leaves both alone.
    expect((await planner.post('/api/cables', solidPe('foam feeder, 75 ω')).expect(409)).body.error.code).toBe('name_taken');
    expect((await planner.post('/api/cables', solidPe('FOAM  FEEDER, 75 Ω')).expect(409)).body.error.code).toBe('name_taken');
    const at = await Promise.all([0, 1, 2, 3].map((i) => planner.post('/api/cables', solidPe(i % 2 ? 'Twin drop, ÄÖ' : 'twin drop, äö'))));
    expect(at.map((r) => r.status).sort()).toEqual([201, 409, 409, 409]);
  });
});

describe('PATCH /api/cables/:id', () => {
  it('needs a reason, writes who/when/old → new/why, and bumps the revision for VF', async () => {
    const { body: c } = await planner.post('/api/cables', solidPe('History coax')).expect(201);
    expect(c.revision).toBe(1);
    const noReason = await planner.patch(`/api/cables/${c.id}`, { vf: 0.67 }).expect(400);
    expect(noReason.body.error.fields[0].field).toBe('reason');

    const res = await planner.patch(`/api/cables/${c.id}`, { vf: 0.672, vfSource: 'field-calibrated', reason: 'Drum measured at the yard' }).expect(200);
    expect(res.body).toMatchObject({ vf: 0.672, vfSource: 'field-calibrated', revision: 2 });

    const notes = await planner.patch(`/api/cables/${c.id}`, { notes: 'Drum 4', reason: 'Note the drum' }).expect(200);
    expect(notes.body.revision).toBe(2); // a note does not change what an analysis uses

    const h = await planner.get(`/api/cables/${c.id}/history`).expect(200);
    expect(h.body).toHaveLength(3);
    expect(h.body[1]).toMatchObject({
      kind: 'update',
      revision: 2,
      reason: 'Drum measured at the yard',
      changedBy: { id: api.users.planner.id, name: 'Pat Plan' },
      changes: [
        { field: 'vf', from: 0.66, to: 0.672 },
        { field: 'vfSource', from: 'handbook', to: 'field-calibrated' },
      ],
    });
    expect(h.body[2]).toMatchObject({ kind: 'create', revision: 1, reason: 'Added to the library' });
    expect(h.body[0].changes).toEqual([{ field: 'notes', from: null, to: 'Drum 4' }]);

    const since = await planner.get(`/api/cables/${c.id}/history?sinceRevision=1`).expect(200);
    expect(since.body.map((e: { reason: string }) => e.reason)).toEqual(['Note the drum', 'Drum measured at the yard']);

    // What the trace analysis compares against.
    const v = await cableTypeVersion(c.id);
    expect(v).toMatchObject({ revision: 2, vf: 0.672, vfTolerance: 0.02, z0Ohm: 50 });
    expect((await changesSince(c.id, 1)).map((e) => e.reason)).toEqual(['Drum measured at the yard']);
    expect(await changesSince(c.id, 2)).toEqual([]);
  });

  it('applies changes made at once one after another, each history row saying what it changed from', async () => {
    const { body: c } = await planner.post('/api/cables', solidPe('Concurrent edit coax')).expect(201);
    const vfs = [0.6, 0.61, 0.62, 0.63, 0.64, 0.65];
    const answers = await Promise.all(vfs.map((vf) => planner.patch(`/api/cables/${c.id}`, { vf, reason: `yard check ${vf}` })));
    expect(answers.map((r) => r.status)).toEqual([200, 200, 200, 200, 200, 200]);
    // Each change bumped the revision once: six distinct revisions after the first.
    expect(answers.map((r) => r.body.revision).sort()).toEqual([2, 3, 4, 5, 6, 7]);
    const h = (await planner.get(`/api/cables/${c.id}/history`).expect(200)).body as Array<{
      revision: number;
      changes: Array<{ field: string; from: number; to: number }>;
    }>;
    const updates = h.filter((e) => e.revision > 1).sort((a, b) => a.revision - b.revision);
    expect(updates).toHaveLength(6);
    // A chain: each change starts from the value the one before left.
    expect(updates[0].changes[0].from).toBe(0.66);
    for (let i = 1; i < updates.length; i++) expect(updates[i].changes[0].from).toBe(updates[i - 1].changes[0].to);
    const final = (await planner.get(`/api/cables/${c.id}`).expect(200)).body;
    expect(final.vf).toBe(updates[5].changes[0].to);
    expect(final.revision).toBe(7);
  });

  it('refuses a change to a value someone else changed after the editor opened the entry, and merges other fields', async () => {
    const { body: c } = await planner.post('/api/cables', solidPe('Two planners coax')).expect(201);
    const other = await api.as('planner');
    // Both open the entry at VF 0.66 and note "x"; the other planner saves first.
    await other.patch(`/api/cables/${c.id}`, { vf: 0.67, reason: 'yard check', basedOn: { vf: 0.66 } }).expect(200);
    const late = await planner.patch(`/api/cables/${c.id}`, { vf: 0.68, reason: 'my check', basedOn: { vf: 0.66 } }).expect(409);
    expect(late.body.error.code).toBe('changed_meanwhile');
    expect(late.body.error.fields).toEqual([{ field: 'vf', message: 'is now 0.67; you started from 0.66' }]);
    expect(late.body.error.message).toMatch(/Someone else changed vf after you opened this entry \(last saved by .+ at \d{4}-\d\d-\d\dT/);
    let now = (await planner.get(`/api/cables/${c.id}`).expect(200)).body;
    expect(now.vf).toBe(0.67);
    expect(now.revision).toBe(2);
    // A field the other planner did not touch merges; starting again from the saved value goes through.
    await planner.patch(`/api/cables/${c.id}`, { vfTolerance: 0.03, reason: 'wider', basedOn: { vfTolerance: 0.02 } }).expect(200);
    await planner.patch(`/api/cables/${c.id}`, { vf: 0.68, reason: 'my check', basedOn: { vf: 0.67 } }).expect(200);
    now = (await planner.get(`/api/cables/${c.id}`).expect(200)).body;
    expect([now.vf, now.vfTolerance, now.revision]).toEqual([0.68, 0.03, 4]);
    // The snapshot names only fields of the library.
    const bad = await planner.patch(`/api/cables/${c.id}`, { vf: 0.69, reason: 'x y z', basedOn: { velocity: 0.68 } }).expect(400);
    expect(bad.body.error.fields[0].field).toMatch(/^basedOn/);
  });

  it('refuses a one-point attenuation set from a stale value when someone else changed the attenuation list meanwhile', async () => {
    const one = { attenuationDbPer100m: 1.3, attenuationFreqMhz: 10, lossSource: 'common practice' };
    const { body: c } = await planner.post('/api/cables', solidPe('One-point loss coax', one)).expect(201);
    const other = await api.as('planner');
    // The other planner saves a new loss through the list; this one opened the entry at 1.3 dB and sets the pair.
    await other
      .patch(`/api/cables/${c.id}`, {
        attenuation: [{ frequencyMhz: 10, dbPer100m: 1.5 }],
        reason: 'new datasheet',
        basedOn: { attenuation: [{ frequencyMhz: 10, dbPer100m: 1.3 }] },
      })
      .expect(200);
    const late = await planner
      .patch(`/api/cables/${c.id}`, { attenuationDbPer100m: 2, reason: 'my reading', basedOn: { attenuationDbPer100m: 1.3 } })
      .expect(409);
    expect(late.body.error.code).toBe('changed_meanwhile');
    expect(late.body.error.fields).toEqual([{ field: 'attenuationDbPer100m', message: 'is now 1.5; you started from 1.3' }]);
    let now = (await planner.get(`/api/cables/${c.id}`).expect(200)).body;
    expect(now.attenuation).toEqual([{ frequencyMhz: 10, dbPer100m: 1.5 }]);
    // The other way round: the list set from a stale snapshot of the pair is refused too.
    const late2 = await planner
      .patch(`/api/cables/${c.id}`, {
        attenuation: [{ frequencyMhz: 10, dbPer100m: 2 }],
        reason: 'my reading',
        basedOn: { attenuationDbPer100m: 1.3, attenuationFreqMhz: 10 },
      })
      .expect(409);
    expect(late2.body.error.fields).toEqual([{ field: 'attenuationDbPer100m', message: 'is now 1.5; you started from 1.3' }]);
    // Started from the saved value, the change goes through.
    await planner.patch(`/api/cables/${c.id}`, { attenuationDbPer100m: 2, reason: 'my reading', basedOn: { attenuationDbPer100m: 1.5 } }).expect(200);
    now = (await planner.get(`/api/cables/${c.id}`).expect(200)).body;
    expect(now.attenuation).toEqual([{ frequencyMhz: 10, dbPer100m: 2 }]);
  });

  it('answers 422 when nothing would change, and 404 for an unknown entry', async () => {
    const { body: c } = await planner.post('/api/cables', solidPe('Same again coax')).expect(201);
    const res = await planner.patch(`/api/cables/${c.id}`, { vf: 0.66, reason: 'no-op' }).expect(422);
    expect(res.body.error.code).toBe('no_change');
    await planner.patch('/api/cables/987654', { vf: 0.7, reason: 'ghost' }).expect(404);
    const h = await planner.get(`/api/cables/${c.id}/history`).expect(200);
    expect(h.body).toHaveLength(1);
  });

  it('validates a partial change the same way as a new entry', async () => {
    const { body: c } = await planner.post('/api/cables', solidPe('Partial coax')).expect(201);
    const res = await planner.patch(`/api/cables/${c.id}`, { vf: 1.5, reason: 'typo' }).expect(400);
    expect(res.body.error.fields).toEqual([{ field: 'vf', message: 'must be at most 1 (nothing is faster than light)' }]);
    const att = await planner.patch(`/api/cables/${c.id}`, { attenuationDbPer100m: 5, reason: 'loss' }).expect(422);
    expect(att.body.error.fields[0].field).toBe('attenuationFreqMhz');
  });
});

describe('GET /api/cables', () => {
  it('searches, sorts and pages on the server', async () => {
    for (const [name, vf] of [
      ['Sort A foam coax', 0.85],
      ['Sort B foam coax', 0.8],
      ['Sort C foam coax', 0.82],
    ] as const) {
      await planner.post('/api/cables', solidPe(name, { vf, dielectric: 'foamed polyethylene' })).expect(201);
    }
    const byVf = await planner.get('/api/cables?q=sort%20foam&sort=vf&dir=desc&pageSize=2').expect(200);
    expect(byVf.body.total).toBe(3);
    expect(byVf.body.items.map((i: { vf: number }) => i.vf)).toEqual([0.85, 0.82]);
    const page2 = await planner.get('/api/cables?q=sort%20foam&sort=vf&dir=desc&pageSize=2&page=2').expect(200);
    expect(page2.body.items.map((i: { name: string }) => i.name)).toEqual(['Sort B foam coax']);
    const byDielectric = await planner.get('/api/cables?q=FOAMED').expect(200);
    expect(byDielectric.body.total).toBe(3);
    const byZ0 = await planner.get('/api/cables?q=sort&sort=z0Ohm&dir=desc').expect(200);
    expect(byZ0.body.items.every((i: { z0Ohm: number }) => i.z0Ohm === 50)).toBe(true);
    const byDate = await planner.get('/api/cables?q=sort&sort=updatedAt&dir=desc').expect(200);
    expect(byDate.body.items[0].name).toBe('Sort C foam coax');
    const bad = await planner.get('/api/cables?sort=colour').expect(400);
    expect(bad.body.error.fields[0].field).toBe('sort');
  });

  it('sorts names and words whatever their letter case, as a reader expects', async () => {
    for (const name of ['Casefold PVC-insulated pair', 'Casefold Paper-insulated cable', 'casefold plain coax']) {
      await planner.post('/api/cables', solidPe(name, { dielectric: name.endsWith('coax') ? 'Air-spaced' : 'paper' })).expect(201);
    }
    const up = await planner.get('/api/cables?q=casefold&sort=name&dir=asc').expect(200);
    expect(up.body.items.map((i: { name: string }) => i.name)).toEqual(['Casefold Paper-insulated cable', 'casefold plain coax', 'Casefold PVC-insulated pair']);
    const down = await planner.get('/api/cables?q=casefold&sort=name&dir=desc').expect(200);
    expect(down.body.items.map((i: { name: string }) => i.name)).toEqual(['Casefold PVC-insulated pair', 'casefold plain coax', 'Casefold Paper-insulated cable']);
    const byDielectric = await planner.get('/api/cables?q=casefold&sort=dielectric&dir=asc').expect(200);
    expect(byDielectric.body.items.map((i: { dielectric: string }) => i.dielectric)).toEqual(['Air-spaced', 'paper', 'paper']);
  });
});

describe('loss and pulse-width VFs', () => {
  // A 0.5 mm PE telephone pair. Attenuation typical of telephone-cable data (from memory);
  // L = Z0/v and C = 1/(Z0·v) for Z0 = 100 Ω, VF = 0.66 (lossless-line formulas, Pozar §2.1): 5.05e-7 H/m, 5.05e-11 F/m.
  const pePair = (name: string, extra: object = {}) =>
    solidPe(name, {
      construction: 'twisted-pair',
      z0Ohm: 100,
      attenuation: [
        { frequencyMhz: 10, dbPer100m: 5.5 },
        { frequencyMhz: 1, dbPer100m: 1.6 },
      ],
      lossSource: 'typical of 0.5 mm PE pairs, from memory',
      lHPerM: 5.05e-7,
      cFPerM: 5.05e-11,
      rDcOhmPerM: 0.176,
      pulseVfs: [{ pulseWidthNs: 1000, vf: 0.628, source: 'yard test on drum 4' }],
      ...extra,
    });

  it('stores attenuation points (lowest frequency first), line constants and pulse-width VFs with their sources', async () => {
    const { body: c } = await planner.post('/api/cables', pePair('Loss pair A')).expect(201);
    expect(c.attenuation).toEqual([
      { frequencyMhz: 1, dbPer100m: 1.6 },
      { frequencyMhz: 10, dbPer100m: 5.5 },
    ]);
    // The older one-point fields repeat the lowest point.
    expect(c).toMatchObject({ attenuationDbPer100m: 1.6, attenuationFreqMhz: 1, lossSource: 'typical of 0.5 mm PE pairs, from memory' });
    expect(c).toMatchObject({ rDcOhmPerM: 0.176, lHPerM: 5.05e-7, cFPerM: 5.05e-11, skinOhmPerMRootHz: null, lossTangent: null });
    expect(c.pulseVfs).toEqual([{ pulseWidthNs: 1000, vf: 0.628, source: 'yard test on drum 4' }]);
    const again = await planner.get(`/api/cables/${c.id}`).expect(200);
    expect(again.body.attenuation).toEqual(c.attenuation);
  });

  it('refuses bad loss figures, naming the field and the entry in the list', async () => {
    const fieldsOf = async (body: object) => {
      const res = await planner.post('/api/cables', body).expect(400);
      expect(res.body.error.code).toBe('invalid_input');
      return res.body.error.fields as Array<{ field: string; message: string }>;
    };
    expect(await fieldsOf(pePair('Bad loss 1', { attenuation: [{ frequencyMhz: 1, dbPer100m: -2 }] }))).toEqual([
      { field: 'attenuation.0.dbPer100m', message: 'must not be negative' },
    ]);
    expect(
      await fieldsOf(pePair('Bad loss 2', { attenuation: [{ frequencyMhz: 1, dbPer100m: 2 }, { frequencyMhz: 1, dbPer100m: 3 }] })),
    ).toEqual([{ field: 'attenuation.1.frequencyMhz', message: 'repeats the frequency 1 (entry 1)' }]);
    expect(await fieldsOf(pePair('Bad loss 3', { lossSource: '' }))).toEqual([
      { field: 'lossSource', message: 'is required with loss figures: say where they come from' },
    ]);
    expect(await fieldsOf(pePair('Bad loss 4', { cFPerM: null }))).toEqual([{ field: 'cFPerM', message: 'is required with the other line constants' }]);
    // 1/(c·√(5.05e-7 · 2e-10)) = 0.332 against the entry's 0.66; Z0 = √(5.05e-7 / 2e-10) = 50.2 Ω, outside 30 % of 100 Ω.
    expect(await fieldsOf(pePair('Bad loss 5', { cFPerM: 2e-10 }))).toEqual([
      { field: 'lHPerM', message: "with C gives Z0 = √(L/C) = 50.2 Ω, far from the entry's 100 Ω: check the exponents" },
    ]);
    expect(await fieldsOf(pePair('Bad loss 6', { pulseVfs: [{ pulseWidthNs: 500, vf: 64, source: 'yard' }] }))).toEqual([
      { field: 'pulseVfs.0.vf', message: 'must be at most 1 (nothing is faster than light)' },
    ]);
    expect(await fieldsOf(pePair('Bad loss 7', { pulseVfs: [{ pulseWidthNs: 500, vf: 0.64 }] }))).toEqual([
      { field: 'pulseVfs.0.source', message: 'is required: say where the figure comes from' },
    ]);
    expect(await fieldsOf(pePair('Bad loss 8', { attenuationDbPer100m: 9, attenuationFreqMhz: 100 }))).toEqual([
      { field: 'attenuationDbPer100m', message: 'is the one-point form of attenuation: give the points in attenuation, or make this one of them' },
    ]);
  });

  it('records loss changes in the history and counts them as a change the analysis sees', async () => {
    const { body: c } = await planner.post('/api/cables', pePair('Loss pair B')).expect(201);
    const res = await planner
      .patch(`/api/cables/${c.id}`, {
        attenuation: [
          { frequencyMhz: 0.1, dbPer100m: 0.55 },
          { frequencyMhz: 1, dbPer100m: 1.6 },
          { frequencyMhz: 10, dbPer100m: 5.5 },
        ],
        pulseVfs: [
          { pulseWidthNs: 100, vf: 0.655, source: 'yard test on drum 4' },
          { pulseWidthNs: 1000, vf: 0.628, source: 'yard test on drum 4' },
        ],
        reason: 'Low-frequency point and a short-pulse VF from the yard',
      })
      .expect(200);
    expect(res.body).toMatchObject({ revision: 2, attenuationDbPer100m: 0.55, attenuationFreqMhz: 0.1 });
    const h = await planner.get(`/api/cables/${c.id}/history`).expect(200);
    expect(h.body[0].changes).toEqual([
      { field: 'attenuation', from: '1 MHz: 1.6 dB; 10 MHz: 5.5 dB', to: '0.1 MHz: 0.55 dB; 1 MHz: 1.6 dB; 10 MHz: 5.5 dB' },
      {
        field: 'pulseVfs',
        from: '1000 ns: 0.628 (yard test on drum 4)',
        to: '100 ns: 0.655 (yard test on drum 4); 1000 ns: 0.628 (yard test on drum 4)',
      },
    ]);
    expect((await changesSince(c.id, 1)).map((e) => e.reason)).toEqual(['Low-frequency point and a short-pulse VF from the yard']);
    const source = await planner.patch(`/api/cables/${c.id}`, { lossSource: 'maker datasheet, issue 3', reason: 'Found the datasheet' }).expect(200);
    expect(source.body.revision).toBe(2); // the wording of a source does not change an analysis
  });

  it('checks a partial change against the stored entry', async () => {
    const { body: c } = await planner.post('/api/cables', pePair('Loss pair C')).expect(201);
    const noSource = await planner.patch(`/api/cables/${c.id}`, { lossSource: null, reason: 'tidy' }).expect(422);
    expect(noSource.body.error.fields).toEqual([{ field: 'lossSource', message: 'is required with loss figures: say where they come from' }]);
    // The one-point form would drop the second point unseen.
    const onePoint = await planner.patch(`/api/cables/${c.id}`, { attenuationDbPer100m: 2, attenuationFreqMhz: 1, reason: 'old client' }).expect(422);
    expect(onePoint.body.error.fields[0].field).toBe('attenuationDbPer100m');
    const cleared = await planner
      .patch(`/api/cables/${c.id}`, { attenuation: [], rDcOhmPerM: null, lHPerM: null, cFPerM: null, lossSource: null, reason: 'figures were for another cable' })
      .expect(200);
    expect(cleared.body).toMatchObject({ attenuation: [], attenuationDbPer100m: null, lossSource: null, lHPerM: null, revision: 2 });
  });
});
