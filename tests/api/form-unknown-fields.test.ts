import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { CableType, CableTypeChange, Trace } from '../../server/db/models';
import { makeRun, stepTraceCsv } from './support/field-fixtures';
import { startApi, type Client, type TestApi } from './support/api';

// A multipart form (a trace upload, a cable-library import) names a field the server does not take: a slip such as
// "pulsewidthNs" for pulseWidthNs or "vfOveride". Dropped without a word, the trace was analysed on the defaults the
// technician meant to change and the answer was 201; JSON bodies are refused by name, and forms must be too.

let api: TestApi;
let runId: number;
let tech: Client;
let planner: Client;

beforeAll(async () => {
  api = await startApi();
  runId = (await makeRun()).run.id;
  tech = await api.as('technician');
  planner = await api.as('planner');
});
afterAll(() => api.close());

type Res = { status: number; body: { error: { code: string; message: string; fields: Array<{ field: string; message: string }> } } };
function expectNamed(res: Res, field: string) {
  expect(res.status).toBe(400);
  expect(res.body.error.code).toBe('invalid_input');
  expect(res.body.error.fields).toContainEqual({ field, message: 'is not expected here' });
  expect(res.body.error.message).toContain(field);
}

const trace = () => Buffer.from(stepTraceCsv({ faultM: 80, vf: 0.66 }));

describe('a trace upload naming a form field the server does not take', () => {
  it('is refused naming the field, and nothing is stored', async () => {
    const before = await Trace.count();
    const res = await tech
      .postRaw('/api/traces')
      .field('cableRunId', String(runId))
      .field('end', 'A')
      .field('pulsewidthNs', '10')
      .attach('file', trace(), 'misspelt-pulse.csv');
    expectNamed(res, 'pulsewidthNs');
    expect(await Trace.count()).toBe(before);
  });

  it('names each unknown field, and still takes the fields it knows', async () => {
    const res = await tech
      .postRaw('/api/traces')
      .field('cableRunId', String(runId))
      .field('end', 'A')
      .field('vfOveride', '0.7')
      .field('vfOverrideReason', 'measured on a known length')
      .field('notes', 'from the cabinet')
      .attach('file', trace(), 'misspelt-vf.csv');
    expectNamed(res, 'vfOveride');
    expectNamed(res, 'notes');
    // The same form with the field spelt right is stored and analysed with the override.
    const ok = await tech
      .postRaw('/api/traces')
      .field('cableRunId', String(runId))
      .field('end', 'A')
      .field('vfOverride', '0.7')
      .field('vfOverrideReason', 'measured on a known length')
      .attach('file', trace(), 'spelt-vf.csv')
      .expect(201);
    expect(ok.body.traces[0].vf).toBe(0.7);
  });
});

const HEADER = 'name,construction,dielectric,z0_ohm,vf,vf_tolerance,attenuation_db_per_100m,attenuation_freq_mhz,vf_source,vf_reference,notes';
/** Foamed PE coax, VF 0.82 ± 0.03 (a handbook range for foam PE, common practice). */
const library = (name: string) => Buffer.from([HEADER, `${name},coax,foamed polyethylene,75,0.82,0.03,,,handbook,"Foam PE coax, handbook range",`].join('\n'), 'utf8');

describe('a cable-library import naming a form field the server does not take', () => {
  it('is refused for the import naming the field, and nothing is imported', async () => {
    const res = await planner.postRaw('/api/cables/import').field('reson', 'yearly update').field('reason', 'yearly update').attach('file', library('Form slip coax'), 'library.csv');
    expectNamed(res, 'reson');
    expect(await CableType.count({ where: { name: 'Form slip coax' } })).toBe(0);
    expect(await CableTypeChange.count()).toBe(0);
  });

  it('is refused for the preview, naming the field', async () => {
    expectNamed(await planner.postRaw('/api/cables/import/preview').field('dryRun', 'yes').attach('file', library('Form preview coax'), 'library.csv'), 'dryRun');
    // The JSON form of both takes csv (and the import its reason), and nothing else.
    const csv = library('Form JSON coax').toString('utf8');
    await planner.post('/api/cables/import/preview', { csv }).expect(200);
    expectNamed(await planner.post('/api/cables/import/preview', { csv, reason: 'not asked for' }), 'reason');
    expectNamed(await planner.post('/api/cables/import', { csv, reason: 'yearly update', dryRun: true }), 'dryRun');
    expect(await CableType.count({ where: { name: 'Form JSON coax' } })).toBe(0);
  });

  it('refuses an unknown parameter of the change history, naming it', async () => {
    const cable = (await CableType.findOne())!;
    await planner.get(`/api/cables/${cable.id}/history?sinceRevision=0`).expect(200);
    expectNamed(await planner.get(`/api/cables/${cable.id}/history?sinceRevison=0`), 'sinceRevison');
  });
});
