import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startApi, type Client, type TestApi } from './support/api';

let api: TestApi;
let planner: Client;
beforeAll(async () => {
  api = await startApi();
  planner = await api.as('planner');
});
afterAll(() => api.close());

const upload = (csv: string) =>
  planner.postRaw('/api/cables/import/preview').attach('file', Buffer.from(csv, 'utf8'), { filename: 'library.csv', contentType: 'text/csv' });

describe('cable library CSV as spreadsheets write it', () => {
  it('reads a semicolon file whose decimals have a comma', async () => {
    const csv = [
      'name;construction;dielectric;z0_ohm;vf;vf_tolerance;vf_source;vf_reference;notes',
      'Semicolon coax;coax;solid polyethylene;50;0,66;0,02;handbook;"Solid PE, 0,66 from εr 2,3";kept; with a semicolon',
    ].join('\r\n');
    // The last cell is unquoted and holds a semicolon, so that row has one cell too many.
    const bad = await upload(csv).expect(200);
    expect(bad.body.rows[0]).toMatchObject({ action: 'invalid', errors: [{ field: '(row)', message: 'has 10 fields, the header has 9' }] });
    const good = await upload(csv.replace('kept; with a semicolon', '"kept; with a semicolon"')).expect(200);
    expect(good.body.counts).toEqual({ create: 1, update: 0, unchanged: 0, invalid: 0 });
    const changes = Object.fromEntries((good.body.rows[0].changes as Array<{ field: string; to: unknown }>).map((c) => [c.field, c.to]));
    expect(changes).toMatchObject({ vf: 0.66, vfTolerance: 0.02, z0Ohm: 50, vfReference: 'Solid PE, 0,66 from εr 2,3', notes: 'kept; with a semicolon' });
  });

  it('still refuses a decimal comma in a comma file, where it cannot be told from a separator', async () => {
    const csv = 'name,construction,dielectric,z0_ohm,vf,vf_tolerance,vf_source,vf_reference\nComma coax,coax,PE,50,"0,66",0.02,handbook,ref';
    const res = await upload(csv).expect(200);
    expect(res.body.rows[0].errors).toEqual([{ field: 'vf', line: 2, message: '"0,66" must be a number with a point for decimals' }]);
  });

  it('says in plain words why a file cannot be read, and where', async () => {
    // The stray quote opens on line 2, the first data row.
    const csv = 'name,construction,dielectric,z0_ohm,vf,vf_tolerance,vf_source,vf_reference\n"Broken coax,coax,PE,50,0.66,0.02,handbook,ref\n';
    const res = await upload(csv).expect(422);
    expect(res.body.error.code).toBe('csv_unreadable');
    expect(res.body.error.message).toBe(
      'The file cannot be read at line 2: a double quote (") opens a cell and is never closed; look for a stray quote on this line.',
    );
    expect(res.body.error.message).not.toMatch(/Quote Not Closed|parsing/);
  });

  it('exports with a UTF-8 byte-order mark, so Ω and – survive a spreadsheet, and reads its own export back', async () => {
    await planner
      .post('/api/cables', { name: 'Mark coax', construction: 'coax', dielectric: 'PTFE', z0Ohm: 50, vf: 0.69, vfTolerance: 0.02, vfSource: 'handbook', vfReference: 'PTFE 0.69–0.70, Ω table' })
      .expect(201);
    const res = await planner.get('/api/cables/export').buffer(true).parse((r, done) => {
      const chunks: Buffer[] = [];
      r.on('data', (c: Buffer) => chunks.push(c));
      r.on('end', () => done(null, Buffer.concat(chunks)));
    });
    const bytes = res.body as Buffer;
    // EF BB BF is U+FEFF in UTF-8 (Unicode Standard, ch. 23.8).
    expect([...bytes.subarray(0, 3)]).toEqual([0xef, 0xbb, 0xbf]);
    expect(bytes.subarray(3, 8).toString('utf8')).toBe('name,');
    expect(bytes.toString('utf8')).toContain('PTFE 0.69–0.70, Ω table');
    const back = await planner
      .postRaw('/api/cables/import/preview')
      .attach('file', bytes, { filename: 'library.csv', contentType: 'text/csv' })
      .expect(200);
    expect(back.body.counts.invalid).toBe(0);
    expect(back.body.counts.create + back.body.counts.update).toBe(0);
  });
});
