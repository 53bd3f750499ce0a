import type { Migration } from './index';

/**
 * The reference trace of a run and end (at most one), found through an index
 * of the references alone. A trace's page and an upload's answer look it up
 * to compare with; without this index each lookup read every trace of the run
 * and end, whole rows with their analysis, about 2.5 ms for 1,800 traces on
 * SQLite, and more as a run's traces add up. The condition is written as Sequelize
 * writes a query's true on each database (1 on SQLite, true on PostgreSQL),
 * so the planner can see that a query for references is covered.
 */
const NAME = 'traces_reference';

export const up: Migration = async ({ context: qi }) => {
  const q = (id: string) => qi.quoteIdentifier(id);
  const isTrue = qi.sequelize.getDialect() === 'postgres' ? 'true' : '1';
  await qi.sequelize.query(`CREATE INDEX IF NOT EXISTS ${q(NAME)} ON ${q('traces')} (${q('cable_run_id')}, ${q('end')}) WHERE ${q('is_reference')} = ${isTrue}`);
};

export const down: Migration = async ({ context: qi }) => {
  await qi.sequelize.query(`DROP INDEX IF EXISTS ${qi.quoteIdentifier(NAME)}`);
};
