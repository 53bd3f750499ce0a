import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { CableType, CableTypeChange, Trace } from '../../server/db/models';
import { makeRun, stepTraceCsv } from './support/field-fixtures';
import { startApi, type Client, type TestApi } from './support/api';

/**
 * A query string or a form that gives one field twice (`?page=1&page=2`, two `vfOverride` parts) arrives as a list.
 * It was refused as "must be a page number, written in digits" or "expected string, received array", which sends
 * the sender looking at the digits; the answer names the field and says it was given more than once, and nothing is
 * stored.
 */
let api: TestApi;
let admin: Client;
let tech: Client;
let planner: Client;
let runId: number;

beforeAll(async () => {
  api = await startApi();
  admin = await api.as('admin');
  tech = await api.as('technician');
  planner = await api.as('planner');
  runId = (await makeRun('Repeated run')).run.id;
});
afterAll(() => api.close());

const ONCE = 'was given more than once; give it once';

describe('a query parameter given twice', () => {
  it.each([
    ['/api/traces?page=1&page=2', 'page'],
    ['/api/users?pageSize=1&pageSize=2', 'pageSize'],
    ['/api/findings?status=confirmed&status=dismissed', 'status'],
    ['/api/sites?q=pump&q=depot', 'q'],
    ['/api/outbox/queue?page=1&page=1', 'page'],
  ])('%s is refused naming %s', async (url, field) => {
    const res = await admin.get(url).expect(400);
    expect(res.body.error.code).toBe('invalid_input');
    expect(res.body.error.fields).toEqual([{ field, message: ONCE }]);
    expect(res.body.error.message).toBe(`The query is not valid: ${field}: ${ONCE}`);
  });

  it('names every field given twice, and the same list read with each once answers', async () => {
    const res = await admin.get('/api/traces?page=1&page=2&pageSize=5&pageSize=6').expect(400);
    expect(res.body.error.fields).toEqual([
      { field: 'page', message: ONCE },
      { field: 'pageSize', message: ONCE },
    ]);
    await admin.get('/api/traces?page=1&pageSize=5').expect(200);
  });
});

describe('a trace upload form giving a field twice', () => {
  it('is refused naming the field, and nothing is stored', async () => {
    const before = await Trace.count();
    const res = await tech
      .postRaw('/api/traces')
      .field('cableRunId', String(runId))
      .field('end', 'A')
      .field('vfOverride', '0.66')
      .field('vfOverride', '0.7')
      .field('vfOverrideReason', 'measured on a known length')
      .attach('file', Buffer.from(stepTraceCsv({ faultM: 80, vf: 0.66 })), 'twice-vf.csv')
      .expect(400);
    expect(res.body.error.code).toBe('invalid_input');
    expect(res.body.error.fields).toEqual([{ field: 'vfOverride', message: ONCE }]);
    expect(await Trace.count()).toBe(before);
  });

  it('refuses the run given twice, even with the same value', async () => {
    const before = await Trace.count();
    const res = await tech
      .postRaw('/api/traces')
      .field('cableRunId', String(runId))
      .field('cableRunId', String(runId))
      .field('end', 'A')
      .attach('file', Buffer.from(stepTraceCsv({ faultM: 70, vf: 0.66 })), 'twice-run.csv')
      .expect(400);
    expect(res.body.error.fields).toEqual([{ field: 'cableRunId', message: ONCE }]);
    expect(await Trace.count()).toBe(before);
  });
});

describe('a cable import form giving its reason twice', () => {
  it('is refused naming the field, and imports nothing', async () => {
    const csv = [
      'name,construction,dielectric,z0_ohm,vf,vf_tolerance,attenuation_db_per_100m,attenuation_freq_mhz,vf_source,vf_reference,notes',
      // Foamed PE coax, VF 0.82 ± 0.03 (a handbook range for foam PE, common practice).
      'Twice coax,coax,foamed polyethylene,75,0.82,0.03,,,handbook,"Foam PE coax, handbook range",',
    ].join('\n');
    const res = await planner
      .postRaw('/api/cables/import')
      .field('reason', 'yearly update')
      .field('reason', 'second thoughts')
      .attach('file', Buffer.from(csv), 'library.csv')
      .expect(400);
    expect(res.body.error.fields).toEqual([{ field: 'reason', message: ONCE }]);
    expect(await CableType.count({ where: { name: 'Twice coax' } })).toBe(0);
    expect(await CableTypeChange.count()).toBe(0);
  });
});

describe('a url-encoded body giving a field twice', () => {
  it('is refused naming the field', async () => {
    const res = await admin
      .postRaw('/api/sites')
      .type('form')
      .send('name=Pump+house&name=Depot&latitude=52&longitude=-1')
      .expect(400);
    expect(res.body.error.fields).toEqual([{ field: 'name', message: ONCE }]);
    expect(res.body.error.message).toBe(`The form is not valid: name: ${ONCE}`);
  });
});
