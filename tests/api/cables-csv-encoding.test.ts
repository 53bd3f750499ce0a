import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startApi, type Client, type TestApi } from './support/api';

// Byte values from the encodings' own tables: in Windows-1252 (and Latin-1) "â" is the single
// byte 0xE2 and "ß" 0xDF; in UTF-8 each is two bytes (C3 A2, C3 9F), and a lone 0xE2 or 0xDF
// followed by an ASCII letter is not UTF-8 (RFC 3629, section 4: a lead byte needs its
// continuation bytes). ED A0 80 is the UTF-8 form of a lone surrogate, which RFC 3629 forbids.

let api: TestApi;
let planner: Client;
beforeAll(async () => {
  api = await startApi();
  planner = await api.as('planner');
});
afterAll(() => api.close());

const HEADER = 'name,construction,dielectric,z0_ohm,vf,vf_tolerance,vf_source,vf_reference\n';
const send = (path: string, bytes: Buffer, reason?: string) => {
  const r = planner.postRaw(path);
  if (reason) r.field('reason', reason);
  return r.attach('file', bytes, { filename: 'library.csv', contentType: 'text/csv' });
};

describe('a cable library file that is not UTF-8', () => {
  it('is refused with the line of the first bad byte, not read with replacement characters', async () => {
    const latin1 = Buffer.from(`${HEADER}Plain coax,coax,PE,50,0.66,0.02,handbook,ref\nCâble blindé ß,coax,PE,75,0.82,0.02,handbook,ref\n`, 'latin1');
    const preview = await send('/api/cables/import/preview', latin1).expect(422);
    expect(preview.body.error.code).toBe('csv_unreadable');
    expect(preview.body.error.fields).toEqual([
      {
        field: 'file',
        line: 3,
        message: 'Line 3: the file is not UTF-8 text (byte 0xE2 after "C"). Save it from the spreadsheet as "CSV UTF-8" and import it again.',
      },
    ]);
    const commit = await send('/api/cables/import', latin1, 'import from the old sheet').expect(422);
    expect(commit.body.error.code).toBe('csv_unreadable');
    const list = await planner.get('/api/cables?pageSize=100').expect(200);
    expect(list.body.total).toBe(0);
  });

  it('is refused for a UTF-8 encoded lone surrogate as well', async () => {
    const bytes = Buffer.concat([Buffer.from(`${HEADER}RG`), Buffer.from([0xed, 0xa0, 0x80]), Buffer.from(',coax,PE,50,0.66,0.02,handbook,ref\n')]);
    const res = await send('/api/cables/import/preview', bytes).expect(422);
    expect(res.body.error.fields[0]).toMatchObject({ field: 'file', line: 2 });
    expect(res.body.error.message).toBe('Line 2: the file is not UTF-8 text (byte 0xED after "RG"). Save it from the spreadsheet as "CSV UTF-8" and import it again.');
  });

  it('reads UTF-16 that carries its byte-order mark, and names UTF-16 without one', async () => {
    const text = `${HEADER}Câble blindé ß,coax,PE,75,0.82,0.02,handbook,εr ≈ 1.5\n`;
    const le = Buffer.concat([Buffer.from([0xff, 0xfe]), Buffer.from(text, 'utf16le')]);
    const be = Buffer.from(le);
    be.swap16();
    for (const bytes of [le, be]) {
      const res = await send('/api/cables/import/preview', bytes).expect(200);
      expect(res.body.rows.map((r: { name: string; action: string }) => [r.name, r.action])).toEqual([['Câble blindé ß', 'create']]);
    }
    const bare = await send('/api/cables/import/preview', Buffer.from(text, 'utf16le')).expect(422);
    expect(bare.body.error.code).toBe('csv_unreadable');
    expect(bare.body.error.fields).toEqual([
      {
        field: 'file',
        line: 1,
        message:
          'Line 1: the file holds a NUL byte (0x00), so it is not UTF-8 text: it looks like UTF-16 saved without its byte-order mark, or not a text file at all. Save it from the spreadsheet as "CSV UTF-8" and import it again.',
      },
    ]);
    // A lone surrogate (0xD800 with no partner) is not UTF-16.
    const broken = Buffer.concat([Buffer.from([0xff, 0xfe]), Buffer.from(HEADER, 'utf16le'), Buffer.from([0x00, 0xd8, 0x41, 0x00])]);
    const res = await send('/api/cables/import/preview', broken).expect(422);
    expect(res.body.error.message).toContain('holds bytes that are not UTF-16');
    expect((await planner.get('/api/cables?pageSize=100').expect(200)).body.total).toBe(0);
  });

  it('still reads real UTF-8, with or without a byte-order mark', async () => {
    const text = `${HEADER}Câble blindé ß,coax,PE,75,0.82,0.02,handbook,εr ≈ 1.5\n`;
    for (const bytes of [Buffer.from(text, 'utf8'), Buffer.concat([Buffer.from([0xef, 0xbb, 0xbf]), Buffer.from(text, 'utf8')])]) {
      const res = await send('/api/cables/import/preview', bytes).expect(200);
      expect(res.body.rows.map((r: { name: string; action: string }) => [r.name, r.action])).toEqual([['Câble blindé ß', 'create']]);
    }
  });
});
