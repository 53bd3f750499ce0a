import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Trace } from '../../server/db/models';
import { makeRun } from './support/field-fixtures';
import { isPostgres, startApi, type TestApi } from './support/api';

let api: TestApi;

beforeAll(async () => {
  api = await startApi();
});
afterAll(() => api.close());

/** The SQL Sequelize sends for the lookup a trace's page makes for its run and end's reference. */
async function referenceLookupSql(cableRunId: number): Promise<string> {
  let sql = '';
  await Trace.findOne({
    where: { cableRunId, end: 'A', isReference: true, status: 'ok' },
    logging: (s: string) => {
      sql = s;
    },
  });
  return sql.replace(/^Executing \([^)]*\): /, '');
}

describe('the reference lookup', () => {
  it('reads the index of references, not every trace of the run and end', async () => {
    const { run } = await makeRun('Reference index run');
    const sql = await referenceLookupSql(run.id);
    expect(sql).toMatch(/is_reference/);
    const sequelize = api.app.ctx.sequelize;
    if (isPostgres) {
      // A test database is too small for the planner to prefer an index unless a table scan is ruled out.
      const plan = await sequelize.transaction(async (transaction) => {
        await sequelize.query('SET LOCAL enable_seqscan = off', { transaction });
        return (await sequelize.query(`EXPLAIN ${sql}`, { transaction, type: 'SELECT' })) as Array<{ 'QUERY PLAN': string }>;
      });
      expect(plan.map((r) => r['QUERY PLAN']).join('\n')).toMatch(/traces_reference/);
    } else {
      const plan = (await sequelize.query(`EXPLAIN QUERY PLAN ${sql}`, { type: 'SELECT' })) as Array<{ detail: string }>;
      expect(plan.map((r) => r.detail).join('\n')).toMatch(/USING INDEX traces_reference \(cable_run_id=\? AND end=\?\)/);
    }
  });
});
