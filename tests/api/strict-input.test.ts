import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { CableRun, Site } from '../../server/db/models';
import { makeRun, stepTraceCsv } from './support/field-fixtures';
import { startApi, type Client, type TestApi } from './support/api';

/**
 * Numbers are read strictly: a JSON body must carry real numbers inside
 * sensible bounds, and a query string or path plain digits. Nothing is
 * guessed ("" → 0, true → 1, [45] → 45, "0x10" → 16) and nothing is stored.
 */
let api: TestApi;
let sup: Client;
let admin: Client;
let fx: Awaited<ReturnType<typeof makeRun>>;

beforeAll(async () => {
  api = await startApi();
  sup = await api.as('supervisor');
  admin = await api.as('admin');
  fx = await makeRun('Strict run');
});
afterAll(() => api?.close());

const site = (over: Record<string, unknown>) => ({ name: 'Pump house', address: null, latitude: 52.1, longitude: -1.5, accessNotes: null, ...over });
const run = (over: Record<string, unknown>) => ({
  siteId: fx.site.id,
  name: `Feeder ${Math.random().toString(36).slice(2, 7)}`,
  cableTypeId: fx.cable.id,
  endALabel: 'Cabinet C-4',
  endBLabel: 'Pole 9',
  installedLengthM: 250,
  notes: null,
  ...over,
});

describe('JSON bodies', () => {
  it.each([
    ['an empty string', ''],
    ['true', true],
    ['a list', [45]],
    ['a hexadecimal string', '0x10'],
    ['a number written as text', '45'],
  ])('refuses %s as a latitude and stores nothing', async (_what, latitude) => {
    const before = await Site.count();
    const res = await sup.post('/api/sites', site({ name: `Refused ${String(_what)}`, latitude })).expect(400);
    expect(res.body.error.code).toBe('invalid_input');
    expect(res.body.error.fields).toEqual([{ field: 'latitude', message: 'must be a number of degrees, or null' }]);
    expect(await Site.count()).toBe(before);
  });

  it('refuses a latitude beyond the pole and accepts one on it', async () => {
    const res = await sup.post('/api/sites', site({ name: 'Too far north', latitude: 90.5 })).expect(400);
    expect(res.body.error.fields).toEqual([{ field: 'latitude', message: 'must be between -90 and 90' }]);
    const ok = await sup.post('/api/sites', site({ name: 'North pole depot', latitude: 90 })).expect(201);
    expect(ok.body.latitude).toBe(90);
  });

  it('refuses true as a site id, and a run length that is infinite or longer than 100 km', async () => {
    const before = await CableRun.count();
    const asTrue = await sup.post('/api/cable-runs', run({ siteId: true })).expect(400);
    expect(asTrue.body.error.fields.map((f: { field: string }) => f.field)).toEqual(['siteId']);
    // 1.8e308 is past the largest double: JSON.parse reads it as Infinity.
    const infinite = await sup
      .postRaw('/api/cable-runs')
      .set('content-type', 'application/json')
      .send(JSON.stringify(run({})).replace('"installedLengthM":250', '"installedLengthM":1.8e308'))
      .expect(400);
    expect(infinite.body.error.fields.map((f: { field: string }) => f.field)).toEqual(['installedLengthM']);
    const tooLong = await sup.post('/api/cable-runs', run({ installedLengthM: 100_001 })).expect(400);
    expect(tooLong.body.error.fields).toEqual([{ field: 'installedLengthM', message: 'installed length must be more than 0 and at most 100,000 m' }]);
    const zero = await sup.post('/api/cable-runs', run({ installedLengthM: 0 })).expect(400);
    expect(zero.body.error.fields[0].field).toBe('installedLengthM');
    expect(await CableRun.count()).toBe(before);
    const ok = await sup.post('/api/cable-runs', run({ installedLengthM: 100_000 })).expect(201);
    expect(ok.body.installedLengthM).toBe(100_000);
  });

  it('refuses a route marker past 100 km and a negative slack', async () => {
    const far = await sup.put(`/api/cable-runs/${fx.run.id}/markers`, { markers: [{ label: 'MH-9', kind: 'manhole', chainageM: 1e9, slackM: 0, notes: null }] }).expect(400);
    expect(far.body.error.fields[0]).toEqual({ field: 'markers.0.chainageM', message: 'chainage must be 0 or more and at most 100,000 m' });
    const slack = await sup.put(`/api/cable-runs/${fx.run.id}/markers`, { markers: [{ label: 'MH-9', kind: 'manhole', chainageM: 10, slackM: -1, notes: null }] }).expect(400);
    expect(slack.body.error.fields[0].field).toBe('markers.0.slackM');
  });
});

describe('query strings and paths', () => {
  it.each([
    ['page=0x10', 'page', 'must be a page number, written in digits'],
    ['page=', 'page', 'must be a page number, written in digits'],
    ['pageSize=1e999', 'pageSize', 'must be a page size, written in digits'],
    ['page=1.5', 'page', 'must be a page number, written in digits'],
    ['page=0', 'page', 'must be 1 or more'],
    ['cableRunId=true', 'cableRunId', 'must be a positive id, written in digits'],
  ])('refuses ?%s', async (query, field, message) => {
    const res = await sup.get(`/api/traces?${query}`).expect(400);
    expect(res.body.error.fields).toEqual([{ field, message }]);
  });

  it.each([
    ['/api/cables?page=', 'page', 'must be a page number, written in digits'],
    ['/api/cables?page=%20', 'page', 'must be a page number, written in digits'],
    ['/api/cables?pageSize=0x10', 'pageSize', 'must be a page size, written in digits'],
    ['/api/cables?pageSize=1e3', 'pageSize', 'must be a page size, written in digits'],
    ['/api/cables?pageSize=201', 'pageSize', 'must be at most 200'],
    ['/api/calibrations?cableTypeId=0x10', 'cableTypeId', 'must be a cable type id, written in digits'],
    ['/api/calibrations?cableTypeId=', 'cableTypeId', 'must be a cable type id, written in digits'],
    ['/api/calibrations?page=%207', 'page', 'must be a page number, written in digits'],
    ['/api/calibrations?pageSize=1e1', 'pageSize', 'must be a page size, written in digits'],
  ])('refuses %s in the cable library and calibration lists', async (url, field, message) => {
    const res = await admin.get(url).expect(400);
    expect(res.body.error.fields).toEqual([{ field, message }]);
  });

  it('reads plain digits in the cable library and calibration lists', async () => {
    const cables = await admin.get('/api/cables?page=1&pageSize=200').expect(200);
    expect(cables.body.items.map((c: { id: number }) => c.id)).toContain(fx.cable.id);
    await admin.get(`/api/calibrations?status=all&cableTypeId=${fx.cable.id}&page=1&pageSize=10`).expect(200);
  });

  it('refuses a cable history revision in hexadecimal, empty, listed twice or negative, and reads plain digits', async () => {
    for (const query of ['sinceRevision=0x10', 'sinceRevision=', 'sinceRevision=1e1']) {
      const res = await admin.get(`/api/cables/${fx.cable.id}/history?${query}`).expect(400);
      expect(res.body.error.fields, query).toEqual([{ field: 'sinceRevision', message: 'must be a revision number, written in digits' }]);
    }
    const twice = await admin.get(`/api/cables/${fx.cable.id}/history?sinceRevision=1&sinceRevision=2`).expect(400);
    expect(twice.body.error.fields).toEqual([{ field: 'sinceRevision', message: 'was given more than once; give it once' }]);
    const negative = await admin.get(`/api/cables/${fx.cable.id}/history?sinceRevision=-1`).expect(400);
    expect(negative.body.error.fields).toEqual([{ field: 'sinceRevision', message: 'must be 0 or more' }]);
    await admin.get(`/api/cables/${fx.cable.id}/history?sinceRevision=0`).expect(200);
  });

  it('reads plain digits', async () => {
    const res = await sup.get(`/api/cable-runs?siteId=${fx.site.id}&page=1&pageSize=10`).expect(200);
    expect(res.body.items.map((r: { id: number }) => r.id)).toContain(fx.run.id);
  });

  it('refuses a zoom window in hexadecimal, empty or past the largest number', async () => {
    const tech = await api.as('technician');
    const up = await tech
      .postRaw('/api/traces')
      .field('cableRunId', String(fx.run.id))
      .field('end', 'A')
      .attach('file', Buffer.from(stepTraceCsv({ faultM: 60, vf: 0.66 })), 'zoom.csv')
      .expect(201);
    const id = up.body.traces[0].id;
    for (const [query, field] of [
      ['fromNs=0x10&toNs=400', 'fromNs'],
      ['fromNs=&toNs=400', 'fromNs'],
      ['fromNs=0&toNs=1e999', 'toNs'],
    ]) {
      const res = await tech.get(`/api/traces/${id}/samples?${query}`).expect(400);
      expect(res.body.error.fields).toEqual([{ field, message: 'must be a time in ns, written in digits' }]);
    }
    await tech.get(`/api/traces/${id}/samples?fromNs=-5.5&toNs=400`).expect(200);
  });

  it('refuses an id in a path that is not plain digits', async () => {
    const hex = await sup.get('/api/sites/0x1').expect(400);
    expect(hex.body.error.fields).toEqual([{ field: 'id', message: 'must be a positive whole number, written in digits' }]);
    await sup.get('/api/sites/1e0').expect(400);
    await sup.get(`/api/sites/${fx.site.id}`).expect(200);
  });
});

describe('NUL characters', () => {
  it('refuses a NUL in a search, an address filter, or a name, naming the field', async () => {
    const q = await admin.get('/api/users?q=ada%00').expect(400);
    expect(q.body.error).toMatchObject({ code: 'nul_byte', fields: [{ field: 'q', message: 'must not contain a NUL character' }] });
    const to = await admin.get('/api/outbox?to=sol%00@example.com').expect(400);
    expect(to.body.error.fields[0].field).toBe('to');
    const before = await Site.count();
    const name = await sup.post('/api/sites', site({ name: 'Pump\u0000house' })).expect(400);
    expect(name.body.error.code).toBe('nul_byte');
    expect(name.body.error.message).toContain('"name"');
    const runName = await sup.post('/api/cable-runs', run({ name: 'Feeder\u00007' })).expect(400);
    expect(runName.body.error.fields[0].field).toBe('name');
    expect(await Site.count()).toBe(before);
  });
});

describe('lone UTF-16 surrogates', () => {
  // A surrogate half alone (U+D800–U+DFFF unpaired) is not a character (The Unicode Standard, ch. 3, D71–D76); JSON can
  // still carry one as "\ud800" (RFC 8259 §8.2), so the server must refuse it rather than store something it cannot read back.
  it('refuses one in a site name, a user name or a nested field, naming the field, and stores nothing', async () => {
    const before = await Site.count();
    const name = await sup.post('/api/sites', site({ name: 'Pump \ud800house' })).expect(400);
    expect(name.body.error.code).toBe('broken_text');
    expect(name.body.error.message).toContain('"name"');
    expect(name.body.error.fields).toEqual([{ field: 'name', message: 'must be valid text: it holds half of a UTF-16 surrogate pair' }]);
    const low = await sup.post('/api/sites', site({ accessNotes: 'gate code \udc00' })).expect(400);
    expect(low.body.error.fields[0].field).toBe('accessNotes');
    expect(await Site.count()).toBe(before);
    const user = await admin.post('/api/users', { email: 'pat.lone@example.com', name: 'Pat \udbff', role: 'technician' }).expect(400);
    expect(user.body.error.fields[0].field).toBe('name');
    const marker = await sup.put(`/api/cable-runs/${fx.run.id}/markers`, { markers: [{ label: 'MH-\ud83d', kind: 'manhole', chainageM: 10, slackM: 0, notes: null }] }).expect(400);
    expect(marker.body.error.fields[0].field).toBe('markers.0.label');
    // A whole pair is a real character (U+1F50C, an electric plug) and is kept.
    const ok = await sup.post('/api/sites', site({ name: 'Plug \ud83d\udd0c house' })).expect(201);
    expect(ok.body.name).toBe('Plug \u{1F50C} house');
  });
});

describe('text-direction controls', () => {
  // U+202A–U+202E and U+2066–U+2069 reorder how text is shown (Unicode Standard Annex #9); CVE-2021-42574 shows the attack.
  it('refuses them in names, titles and nested fields, naming the field, and drops them from an uploaded file name', async () => {
    const before = await Site.count();
    const name = await sup.post('/api/sites', site({ name: 'Pump \u202ehouse' })).expect(400);
    expect(name.body.error.code).toBe('hidden_direction_mark');
    expect(name.body.error.fields[0].field).toBe('name');
    const user = await admin.post('/api/users', { email: 'ada.rlo@example.com', name: 'Ad\u202emin', role: 'technician' }).expect(400);
    expect(user.body.error.fields[0].field).toBe('name');
    const marker = await sup.put(`/api/cable-runs/${fx.run.id}/markers`, { markers: [{ label: 'MH-\u2066 1', kind: 'manhole', chainageM: 10, slackM: 0, notes: null }] }).expect(400);
    expect(marker.body.error.fields[0].field).toBe('markers.0.label');
    const search = await sup.get(`/api/sites?q=${encodeURIComponent('a\u2069')}`).expect(400);
    expect(search.body.error.code).toBe('hidden_direction_mark');
    expect(await Site.count()).toBe(before);
    // Right-to-left letters themselves are text, and are kept.
    const rtl = await sup.post('/api/sites', site({ name: 'محطة الضخ' })).expect(201);
    expect(rtl.body.name).toBe('محطة الضخ');

    const tech = await api.as('technician');
    const up = await tech
      .postRaw('/api/traces')
      .field('cableRunId', String(fx.run.id))
      .field('end', 'A')
      .attach('file', Buffer.from(stepTraceCsv({ faultM: 42, vf: 0.66 })), 'pole\u202evsc.csv')
      .expect(201);
    expect(up.body.traces[0].originalName).toBe('polevsc.csv');
  });
});
