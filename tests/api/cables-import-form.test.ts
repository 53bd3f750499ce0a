import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { CableType, CableTypeChange } from '../../server/db/models';
import { startApi, type Client, type TestApi } from './support/api';

/** The cable library's CSV import read as a multipart form: what a broken or hostile form gets back, and what is stored. */
let api: TestApi;
let planner: Client;
beforeAll(async () => {
  api = await startApi();
  planner = await api.as('planner');
});
afterAll(() => api.close());

const HEADER = 'name,construction,dielectric,z0_ohm,vf,vf_tolerance,attenuation_db_per_100m,attenuation_freq_mhz,vf_source,vf_reference,notes';
/** Foamed PE coax, VF 0.82 ± 0.03 (a handbook range for foam PE, common practice). */
const row = (name: string) => `${name},coax,foamed polyethylene,75,0.82,0.03,,,handbook,"Foam PE coax, handbook range",`;
const csv = (name: string) => Buffer.from([HEADER, row(name)].join('\n'), 'utf8');

describe('POST /api/cables/import form fields', () => {
  it('refuses a NUL character or a text-direction control in the reason, naming the field, and imports nothing', async () => {
    const nul = await planner.postRaw('/api/cables/import').field('reason', 'yearly\0update').attach('file', csv('Form NUL coax'), 'library.csv').expect(400);
    expect(nul.body.error.code).toBe('nul_byte');
    expect(nul.body.error.fields).toEqual([{ field: 'reason', message: 'must not contain a NUL character' }]);

    const bidi = await planner.postRaw('/api/cables/import').field('reason', 'yearly \u202Etadpu').attach('file', csv('Form bidi coax'), 'library.csv').expect(400);
    expect(bidi.body.error.code).toBe('hidden_direction_mark');
    expect(bidi.body.error.fields[0].field).toBe('reason');

    expect(await CableType.count({ where: { name: ['Form NUL coax', 'Form bidi coax'] } })).toBe(0);
    expect(await CableTypeChange.count()).toBe(0);
  });

  it('records the file name as the user sees it: UTF-8 read as such, direction controls dropped', async () => {
    // "kábel" (UTF-8 á = C3 A1) with a right-to-left override: the override would show "bil.csv" reversed in the history.
    const res = await planner.postRaw('/api/cables/import').field('reason', 'yearly update').attach('file', csv('Form name coax'), 'k\u00e1bel-\u202Ebil.csv').expect(200);
    expect(res.body.counts.create).toBe(1);
    const cable = await CableType.findOne({ where: { name: 'Form name coax' } });
    const change = await CableTypeChange.findOne({ where: { cableTypeId: cable!.id } });
    expect(change!.reason).toBe('Import of k\u00e1bel-bil.csv: yearly update');
  });
});
