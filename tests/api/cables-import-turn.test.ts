import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { CableType, CableTypeChange } from '../../server/db/models';
import { nameKey } from '../../server/db/name-key';
import { startApi, type Client, type TestApi } from './support/api';
import { foamPeRow, LIBRARY_CSV_HEADER } from './support/cables';

let api: TestApi;
let planner: Client;
beforeAll(async () => {
  api = await startApi();
  planner = await api.as('planner');
});
afterAll(() => api.close());

const HEADER = LIBRARY_CSV_HEADER;
const rows = (n: number, prefix: string) => Array.from({ length: n }, (_, i) => foamPeRow(`${prefix} ${String(i + 1).padStart(4, '0')}`));

/** Statements run inside each write transaction while `work` runs, by transaction. */
async function statementsPerTransaction(work: () => Promise<unknown>) {
  const sequelize = api.app.ctx.sequelize;
  const per = new Map<string, number>();
  const count = (options: { transaction?: { id?: string } | null }) => {
    const id = options.transaction?.id;
    if (id) per.set(id, (per.get(id) ?? 0) + 1);
  };
  sequelize.addHook('beforeQuery', 'count-statements', count as never);
  try {
    await work();
  } finally {
    sequelize.removeHook('beforeQuery', 'count-statements');
  }
  return [...per.values()];
}

describe('a library import of 2000 rows', () => {
  it('writes every row with its history in one short transaction: a few statements per few hundred rows, not several per row', async () => {
    const csv = [HEADER, ...rows(2000, 'Bulk foam coax')].join('\n');
    const turns = await statementsPerTransaction(() =>
      planner.postRaw('/api/cables/import').attach('file', Buffer.from(csv, 'utf8'), { filename: 'big.csv', contentType: 'text/csv' }).field('reason', 'Drum list').expect(200),
    );
    // One write transaction. Its statements: begin, the library state, per 200 rows one insert, one read of the new
    // ids and one history insert (10 × 3), commit. Writing row by row took three or more per row (6000+).
    expect(turns).toHaveLength(1);
    expect(turns[0]).toBeLessThanOrEqual(40);

    const added = await CableType.findAll({ where: { vfReference: 'Foam PE coax handbook range' }, order: [['name', 'ASC']] });
    expect(added).toHaveLength(2000);
    expect(added[0]).toMatchObject({ name: 'Bulk foam coax 0001', nameKey: nameKey('Bulk foam coax 0001'), revision: 1, vf: 0.82, vfTolerance: 0.03, z0Ohm: 75 });
    expect(added[1999].name).toBe('Bulk foam coax 2000');
    const history = await CableTypeChange.findAll({ where: { cableTypeId: added.map((c) => c.id) } });
    expect(history).toHaveLength(2000);
    expect(new Set(history.map((h) => h.cableTypeId)).size).toBe(2000);
    expect(history.every((h) => h.kind === 'import' && h.revision === 1 && h.reason === 'Import of big.csv: Drum list' && h.changedById === api.users.planner.id)).toBe(true);
    const first = history.find((h) => h.cableTypeId === added[0].id)!;
    expect(first.changes).toContainEqual({ field: 'vf', from: null, to: 0.82 });
  });

  it('checks the rows again inside the transaction when the library changed after they were checked', async () => {
    // Another planner adds one of the file's names just after the file was checked against the library, before the
    // import's transaction: inside it, that row is an update of their entry, not a second entry of the same name.
    const csv = [HEADER, ...rows(300, 'Race foam coax')].join('\n');
    const sequelize = api.app.ctx.sequelize;
    let libraryReads = 0;
    const addMeanwhile = async (options: { transaction?: unknown }, query: unknown) => {
      const sql = String((query as { sql?: string })?.sql ?? query);
      if (options.transaction || !/^SELECT[\s\S]*FROM ["`]cable_types["`]/i.test(sql)) return;
      // The library's state, then the file's check: the entry lands right after the check has read the library.
      if (++libraryReads !== 2) return;
      await CableType.create({ name: 'Race foam coax 0150', construction: 'coax', dielectric: 'PE', z0Ohm: 75, vf: 0.66, vfTolerance: 0.02, vfSource: 'handbook', vfReference: 'solid PE' });
    };
    sequelize.addHook('afterQuery', 'add-meanwhile', addMeanwhile as never);
    let res;
    try {
      res = await planner.postRaw('/api/cables/import').attach('file', Buffer.from(csv, 'utf8'), { filename: 'race.csv', contentType: 'text/csv' }).field('reason', 'Race').expect(200);
    } finally {
      sequelize.removeHook('afterQuery', 'add-meanwhile');
    }
    expect(libraryReads).toBeGreaterThanOrEqual(2);
    expect(res.body.counts).toEqual({ create: 299, update: 1, unchanged: 0, invalid: 0 });
    const same = await CableType.findAll({ where: { nameKey: nameKey('Race foam coax 0150') } });
    expect(same).toHaveLength(1);
    expect(same[0]).toMatchObject({ vf: 0.82, revision: 2, vfReference: 'Foam PE coax handbook range' });
    expect(await CableType.count({ where: { vfReference: 'Foam PE coax handbook range' } })).toBe(2300);
  });
});
