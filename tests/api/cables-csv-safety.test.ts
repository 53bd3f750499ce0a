import { parse } from 'csv-parse/sync';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { CableType } from '../../server/db/models';
import { startApi, type Client, type TestApi } from './support/api';

let api: TestApi;
let planner: Client;

// Cells a spreadsheet would run as formulas (OWASP "CSV Injection": = + - @ tab CR at the start).
const HOSTILE = {
  name: '=HYPERLINK("http://example.com/x","Click")',
  dielectric: '+foam PE',
  vfReference: '-2+3 from the drum label',
  notes: '@SUM(A1:A9)',
};

beforeAll(async () => {
  api = await startApi();
  planner = await api.as('planner');
  await planner
    .post('/api/cables', {
      name: HOSTILE.name,
      construction: 'coax',
      dielectric: HOSTILE.dielectric,
      z0Ohm: 75,
      vf: 0.82,
      vfTolerance: 0.03,
      vfSource: 'handbook',
      vfReference: HOSTILE.vfReference,
      notes: HOSTILE.notes,
    })
    .expect(201);
  await planner
    .post('/api/cables', {
      name: "'=already quoted by someone",
      construction: 'coax',
      dielectric: 'PTFE',
      z0Ohm: 50,
      vf: 0.69,
      vfTolerance: 0.02,
      vfSource: 'handbook',
      vfReference: 'PTFE, handbook',
    })
    .expect(201);
});
afterAll(() => api.close());

async function exportRows() {
  const res = await planner.get('/api/cables/export').expect(200);
  return { text: res.text, rows: parse(res.text, { columns: true, bom: true }) as Array<Record<string, string>> };
}

describe('GET /api/cables/export', () => {
  it('starts formula-like text cells with a single quote and leaves numbers alone', async () => {
    const { rows } = await exportRows();
    const hostile = rows.find((r) => r.name.includes('HYPERLINK'))!;
    expect(hostile.name).toBe(`'${HOSTILE.name}`);
    expect(hostile.dielectric).toBe(`'${HOSTILE.dielectric}`);
    expect(hostile.vf_reference).toBe(`'${HOSTILE.vfReference}`);
    expect(hostile.notes).toBe(`'${HOSTILE.notes}`);
    expect(hostile.construction).toBe('coax');
    expect(hostile.z0_ohm).toBe('75');
    expect(hostile.vf).toBe('0.82');
    // A value that already began with a quote before "=" gets one more, so it comes back as it was.
    expect(rows.some((r) => r.name === "''=already quoted by someone")).toBe(true);
    // No cell of the file begins with a formula character.
    for (const r of rows) for (const cell of Object.values(r)) if (!/^-?\d/.test(cell)) expect(cell).not.toMatch(/^[=+\-@\t\r]/);
  });

  it('reads back through the importer unchanged: every row matches the library', async () => {
    const { text } = await exportRows();
    const count = await CableType.count();
    const res = await planner
      .postRaw('/api/cables/import/preview')
      .attach('file', Buffer.from(text, 'utf8'), { filename: 'library.csv', contentType: 'text/csv' })
      .expect(200);
    expect(res.body.counts).toEqual({ create: 0, update: 0, unchanged: count, invalid: 0 });
    const names = (res.body.rows as Array<{ name: string }>).map((r) => r.name);
    expect(names).toContain(HOSTILE.name);
    expect(names).toContain("'=already quoted by someone");
    const stored = await CableType.findOne({ where: { name: HOSTILE.name } });
    expect(stored).toMatchObject({ dielectric: HOSTILE.dielectric, vfReference: HOSTILE.vfReference, notes: HOSTILE.notes });
  });
});
