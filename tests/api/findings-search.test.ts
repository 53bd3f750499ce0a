import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Finding } from '../../server/db/models';
import { makeRun, stepTraceCsv } from './support/field-fixtures';
import { startApi, type TestApi } from './support/api';

let api: TestApi;
let fx: Awaited<ReturnType<typeof makeRun>>;
const ids: Record<string, number> = {};

// Notes chosen to test the search's edges: case, punctuation, % and _, quotes,
// letters beyond ASCII, and the two letters (KELVIN SIGN U+212A, LONG S U+017F)
// that Unicode folds to ASCII k and s but SQLite's LIKE leaves alone.
const NOTES: Record<string, string | null> = {
  hedgeUpper: 'Under the HEDGE by the stile',
  kerb: 'dig by the kerb',
  hedgeRoot: 'hedge root, not a fault',
  splice: 'water in the splice',
  kelvin: 'dig by the \u212aerb',
  longS: '\u017ftile crushed',
  none: null,
  marks: 'Quote "x" and 100% and b_1',
  umlaut: 'Ärger at the Öffnung',
};

/** Today's search written out: LIKE (SQLite) or ILIKE (PostgreSQL) over the three columns and the site's and run's names, every row tested. */
async function scan(text: string): Promise<number[]> {
  const s = Finding.sequelize!;
  const like = s.getDialect() === 'postgres' ? 'ILIKE' : 'LIKE';
  const pattern = s.escape(`%${text.replace(/[\\%_]/g, (c) => `\\${c}`)}%`);
  const [rows] = await s.query(
    `SELECT id FROM findings WHERE cable_run_id = ${fx.run.id} AND (note ${like} ${pattern} ESCAPE '\\' OR kind ${like} ${pattern} ESCAPE '\\' OR route_position_text ${like} ${pattern} ESCAPE '\\'` +
      ` OR site_id IN (SELECT id FROM sites WHERE name ${like} ${pattern} ESCAPE '\\') OR cable_run_id IN (SELECT id FROM cable_runs WHERE name ${like} ${pattern} ESCAPE '\\')) ORDER BY id`,
  );
  return (rows as Array<{ id: number }>).map((r) => Number(r.id));
}

async function search(text: string): Promise<{ ids: number[]; total: number }> {
  const c = await api.as('technician');
  const res = await c.get(`/api/findings?cableRunId=${fx.run.id}&q=${encodeURIComponent(text)}&pageSize=100`).expect(200);
  return { ids: (res.body.items as Array<{ id: number }>).map((f) => f.id).sort((a, b) => a - b), total: res.body.total };
}

const QUERIES = [
  'hedge', 'HEDGE', 'Hedge', 'kerb', 'KERB', 'stile', 'tile', 'by the', 'the', 'pumphouse', '"x"', 'Quote "x', '100%', 'b_1',
  'e b', 'no', 'Ärger', 'ärger', 'ÄRGER', '\u212aerb', '\u017ftile', 'open-conductor', 'OPEN-COND', 'past end', 'xyz',
  'text search run', 'SEARCH RUN SITE', 'run site',
];

beforeAll(async () => {
  api = await startApi();
  fx = await makeRun('Text search run');
  const tech = await api.as('technician');
  const up = await tech
    .postRaw('/api/traces')
    .field('cableRunId', String(fx.run.id))
    .field('end', 'A')
    .attach('file', Buffer.from(stepTraceCsv({ faultM: 70, vf: 0.66 })), 'search.csv')
    .expect(201);
  const traceId = up.body.traces[0].id as number;
  const first = await tech.post('/api/findings', { traceId, eventIndex: 0, status: 'confirmed', kind: 'open-conductor', note: 'template' }).expect(201);
  const template = (await Finding.findByPk(first.body.id))!;
  const { id: _id, createdAt: _c, updatedAt: _u, ...base } = template.get({ plain: true });
  let k = 1;
  for (const [key, note] of Object.entries(NOTES)) {
    const f = await Finding.create({ ...base, eventIndex: k++, note });
    ids[key] = f.id;
  }
  // The template itself is found by its kind and route position, not its note.
  await template.update({ note: 'first reading' });
  ids.template = template.id;
});
afterAll(() => api.close());

describe('finding text search', () => {
  it('finds what the plain LIKE/ILIKE scan finds, for every query', async () => {
    for (const q of QUERIES) {
      const expected = await scan(q);
      const got = await search(q);
      expect({ q, ids: got.ids, total: got.total }).toEqual({ q, ids: expected, total: expected.length });
    }
  });

  it('matches ASCII letters in any case, and % _ and quotes as written', async () => {
    expect((await search('hedge')).ids).toEqual([ids.hedgeUpper, ids.hedgeRoot].sort((a, b) => a - b));
    expect((await search('HEDGE')).ids).toEqual([ids.hedgeUpper, ids.hedgeRoot].sort((a, b) => a - b));
    expect((await search('100%')).ids).toEqual([ids.marks]);
    expect((await search('b_1')).ids).toEqual([ids.marks]);
    expect((await search('Quote "x')).ids).toEqual([ids.marks]);
    expect((await search('pumphouse')).total).toBe(0);
    // Every finding here is an open conductor, told by its kind.
    expect((await search('open-conductor')).total).toBe(Object.keys(NOTES).length + 1);
  });

  it('keeps up with notes changed and findings removed', async () => {
    await Finding.update({ note: 'pumphouse flooded' }, { where: { id: ids.splice } });
    expect((await search('pumphouse')).ids).toEqual([ids.splice]);
    expect((await search('splice')).ids).toEqual(await scan('splice'));
    expect((await search('splice')).ids).not.toContain(ids.splice);
    await Finding.destroy({ where: { id: ids.hedgeRoot } });
    expect((await search('hedge')).ids).toEqual([ids.hedgeUpper]);
    for (const q of QUERIES) expect({ q, ids: (await search(q)).ids }).toEqual({ q, ids: await scan(q) });
  });
});

// The CI's second pass runs these tests on PostgreSQL, whose ILIKE folds by the database's collation.
const onPostgres = /^postgres(ql)?:\/\//.test(process.env.DATABASE_URL ?? '');

describe.skipIf(onPostgres)('finding text search on SQLite', () => {
  it('leaves letters beyond ASCII in their own case, as LIKE does', async () => {
    // SQLite's LIKE folds ASCII letters only (sqlite.org, "The LIKE, GLOB, REGEXP, MATCH, and extract operators").
    expect((await search('kerb')).ids).toEqual([ids.kerb]);
    expect((await search('\u212aerb')).ids).toEqual([ids.kelvin]);
    expect((await search('stile')).ids).toEqual([ids.hedgeUpper]);
    expect((await search('Ärger')).ids).toEqual([ids.umlaut]);
    expect((await search('ärger')).total).toBe(0);
  });
});
