import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { CableType, CableTypeChange } from '../../server/db/models';
import { startApi, type Client, type TestApi } from './support/api';
import { foamPeRow, LIBRARY_CSV_HEADER } from './support/cables';

/** The cable library's CSV import read as a multipart form: what a broken or hostile form gets back, and what is stored. */
let api: TestApi;
let planner: Client;
beforeAll(async () => {
  api = await startApi();
  planner = await api.as('planner');
});
afterAll(() => api.close());

const HEADER = LIBRARY_CSV_HEADER;
const row = foamPeRow;
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

  it('refuses a form with many fields or an over-long field (held in memory) with a 4xx naming the limit, and imports nothing', async () => {
    let many = planner.postRaw('/api/cables/import/preview');
    for (let i = 0; i < 200; i++) many = many.field(`extra${i}`, 'x'.repeat(1000));
    const res = await many.attach('file', csv('Form many coax'), 'library.csv').expect(400);
    expect(res.body.error.code).toBe('bad_upload');
    expect(res.body.error.message).toMatch(/too many fields/);

    // The reason may be 2000 characters (reasonSchema); 64 KiB of it is no reason.
    const long = await planner.postRaw('/api/cables/import').field('reason', 'y'.repeat(65_000)).attach('file', csv('Form long coax'), 'library.csv').expect(413);
    expect(long.body.error.code).toBe('field_too_large');
    expect(long.body.error.fields[0].field).toBe('reason');
    expect(await CableType.count({ where: { name: ['Form many coax', 'Form long coax'] } })).toBe(0);
  });

  it('refuses a direction control inside a cell of the file, naming the line and column, and imports nothing', async () => {
    // "Foam coax" with a right-to-left override: the library list would show the name in another order than stored.
    const text = [HEADER, row('Form \u202Exaoc'), row('Form plain coax')].join('\n');
    const res = await planner.postRaw('/api/cables/import').field('reason', 'yearly update').attach('file', Buffer.from(text, 'utf8'), 'library.csv').expect(422);
    expect(res.body.error.code).toBe('import_invalid');
    expect(res.body.error.fields).toEqual([{ field: 'name', line: 2, message: 'must not contain text-direction controls (U+202A–U+202E, U+2066–U+2069)' }]);
    expect(await CableType.count({ where: { name: ['Form \u202Exaoc', 'Form plain coax'] } })).toBe(0);
  });
});
