import { Sequelize } from 'sequelize';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { migrator } from '../../server/db/migrations';
import { Site } from '../../server/db/models';
import { startApi, type Client, type TestApi } from './support/api';
import { solidPeCoax } from './support/cables';

// Names are stored with their folded form (name_key) under a unique index: checked in one lookup,
// searched in every script, and never doubled even by writers side by side.

describe('the name-key migration', () => {
  it('keeps every stored name, giving the later of two names that fold alike a key of its own', async () => {
    const seq = new Sequelize({ dialect: 'sqlite', storage: ':memory:', logging: false });
    try {
      await migrator(seq).up({ to: '0019-trace-reference-index' });
      const now = new Date().toISOString();
      for (const name of ['North Yard', 'NORTH  yard', 'Écluse 3', 'écluse 3', 'Quay'])
        await seq.query('INSERT INTO sites (name, created_at, updated_at) VALUES (:name, :now, :now)', { replacements: { name, now } });
      await migrator(seq).up();
      const [rows] = await seq.query('SELECT id, name, name_key FROM sites ORDER BY id');
      expect(rows).toEqual([
        { id: 1, name: 'North Yard', name_key: 'north yard' },
        { id: 2, name: 'NORTH  yard', name_key: 'north yard#2' },
        { id: 3, name: 'Écluse 3', name_key: 'écluse 3' },
        { id: 4, name: 'écluse 3', name_key: 'écluse 3#4' },
        { id: 5, name: 'Quay', name_key: 'quay' },
      ]);
      // The index refuses a third "north yard" written past the service's check.
      await expect(
        seq.query("INSERT INTO sites (name, name_key, created_at, updated_at) VALUES ('north YARD', 'north yard', :now, :now)", { replacements: { now } }),
      ).rejects.toMatchObject({ name: 'SequelizeUniqueConstraintError' });
      await migrator(seq).down({ to: '0020-name-keys' });
      const [cols] = await seq.query("SELECT name FROM pragma_table_info('sites')");
      expect((cols as Array<{ name: string }>).map((c) => c.name)).not.toContain('name_key');
    } finally {
      await seq.close();
    }
  });
});

describe('stored name keys', () => {
  let api: TestApi;
  let planner: Client;
  beforeAll(async () => {
    api = await startApi();
    planner = await api.as('planner');
  });
  afterAll(() => api.close());

  it('are written on create and on rename, in every script, and a rename to a taken name is refused', async () => {
    const sup = await api.as('supervisor');
    const a = (await sup.post('/api/sites', { name: 'Œuvre  Straße' }).expect(201)).body;
    expect((await Site.findByPk(a.id))!.nameKey).toBe('œuvre strasse');
    const b = (await sup.post('/api/sites', { name: 'Harbour Ω' }).expect(201)).body;
    expect((await Site.findByPk(b.id))!.nameKey).toBe('harbour ω');
    const taken = await sup.put(`/api/sites/${b.id}`, { name: 'ŒUVRE STRASSE' }).expect(409);
    expect(taken.body.error.code).toBe('site_name_taken');
    await sup.put(`/api/sites/${b.id}`, { name: 'Harbour North' }).expect(200);
    expect((await Site.findByPk(b.id))!.nameKey).toBe('harbour north');
    // A bulk rename keeps the key too.
    await Site.update({ name: 'Harbour ÉAST' }, { where: { id: b.id } });
    expect((await Site.findByPk(b.id))!.nameKey).toBe('harbour éast');
  });

  it('refuse, with the field named, a name whose folded form would not fit its stored key', async () => {
    // U+FDFA is one character that NFKC writes out as 18: 120 of them fold to 2160, more than the 480 the key holds
    // (and on PostgreSQL more than its varchar(480) column and its index accept).
    const long = '\uFDFA'.repeat(120);
    expect(long.normalize('NFKC')).toHaveLength(2160);
    const sup = await api.as('supervisor');
    const site = await sup.post('/api/sites', { name: long }).expect(400);
    expect(site.body.error.fields).toEqual([{ field: 'name', message: 'is too long once written out in full: its characters stand for 2160 letters and signs, at most 480' }]);
    const cable = await planner.post('/api/cables', solidPeCoax(long));
    expect(cable.status).toBe(400);
    expect(cable.body.error.fields).toEqual([{ field: 'name', message: 'is too long once written out in full: its characters stand for 2160 letters and signs, at most 480' }]);
    const { body: s } = await sup.post('/api/sites', { name: 'Long-name yard' }).expect(201);
    const run = await sup.post('/api/cable-runs', { siteId: s.id, name: long, cableTypeId: 1, endALabel: 'A', endBLabel: 'B', installedLengthM: 100 });
    expect(run.status).toBe(400);
    expect(run.body.error.fields).toEqual([{ field: 'name', message: 'is too long once written out in full: its characters stand for 2160 letters and signs, at most 480' }]);
    // Nothing was stored; a name that folds to 480 exactly is kept.
    expect(await Site.count({ where: { name: long } })).toBe(0);
    const fits = '\uFDFA'.repeat(26) + 'a'.repeat(12);
    await sup.post('/api/sites', { name: fits }).expect(201);
    const over = await sup.post('/api/sites', { name: `${fits}a` }).expect(400);
    expect(over.body.error.fields[0].message).toBe('is too long once written out in full: its characters stand for 481 letters and signs, at most 480');
  });

  it('make a search find a name whatever the letter case of any script', async () => {
    const sup = await api.as('supervisor');
    await sup.post('/api/sites', { name: 'ÉCOLE DU PONT' }).expect(201);
    for (const q of ['école', 'ÉCOLE', 'ecole du', 'École du pont']) {
      const res = await planner.get(`/api/sites?q=${encodeURIComponent(q)}`).expect(200);
      const names = (res.body.items as Array<{ name: string }>).map((s) => s.name);
      if (q === 'ecole du') expect(names).not.toContain('ÉCOLE DU PONT'); // an accent is a letter of its own
      else expect(names).toContain('ÉCOLE DU PONT');
    }
  });
});
