import type { Migration } from './index';

/**
 * An index for the finding list's text search (note, kind and route position
 * sentence, matched anywhere in the text), so a search reads the rows that
 * hold the text instead of testing every finding.
 *  - SQLite: an FTS5 table with the trigram tokenizer over the three columns,
 *    holding no copy of the text (content = the findings table), kept in step
 *    by triggers. The search takes what it finds, less the findings where
 *    its wider case folding matched and LIKE would not, so the results are
 *    those of LIKE as before. Sequelize rebuilds a SQLite table to change or
 *    remove a column, which drops its triggers: a later migration doing that
 *    to findings must create these triggers again (and 'rebuild' the index).
 *  - PostgreSQL: pg_trgm GIN indexes on the three columns, which ILIKE uses
 *    as it is. pg_trgm ships with PostgreSQL and may be created by a
 *    database's owner; where it cannot be created the search still works,
 *    unindexed, as before.
 */
export const FINDINGS_TEXT_FTS = 'findings_text_fts';
const COLUMNS = ['note', 'kind', 'route_position_text'];
/**
 * The trigram index folds case by Unicode's rules, LIKE by ASCII's; the only
 * letters the two tell apart in ASCII text are these two, which the index
 * folds to k and s. The few findings holding either are listed in a small
 * partial index, so the search can give them the LIKE test without reading
 * the others.
 */
export const FOLDED_TO_ASCII = ['\u212a', '\u017f'];
export const FINDINGS_FOLDED_WHERE = COLUMNS.flatMap((c) => FOLDED_TO_ASCII.map((ch) => `instr(${c}, '${ch}') > 0`)).join(' OR ');
const PG_INDEXES = COLUMNS.map((c) => [`findings_${c}_trgm`, c] as const);

export const up: Migration = async ({ context: qi }) => {
  const s = qi.sequelize;
  if (s.getDialect() === 'postgres') {
    const [available] = await s.query(`SELECT 1 FROM pg_available_extensions WHERE name = 'pg_trgm'`);
    if (available.length === 0) return;
    try {
      await s.query('CREATE EXTENSION IF NOT EXISTS pg_trgm');
    } catch {
      // Not allowed for this role: the search stays unindexed.
      return;
    }
    for (const [name, column] of PG_INDEXES) {
      await s.query(`CREATE INDEX IF NOT EXISTS "${name}" ON "findings" USING gin ("${column}" gin_trgm_ops)`);
    }
    return;
  }
  const cols = COLUMNS.join(', ');
  const newCols = COLUMNS.map((c) => `new.${c}`).join(', ');
  const oldCols = COLUMNS.map((c) => `old.${c}`).join(', ');
  await s.query(
    `CREATE VIRTUAL TABLE ${FINDINGS_TEXT_FTS} USING fts5(${cols}, content='findings', content_rowid='id', tokenize='trigram')`,
  );
  await s.query(
    `CREATE TRIGGER findings_text_fts_insert AFTER INSERT ON findings BEGIN
       INSERT INTO ${FINDINGS_TEXT_FTS}(rowid, ${cols}) VALUES (new.id, ${newCols});
     END`,
  );
  await s.query(
    `CREATE TRIGGER findings_text_fts_delete AFTER DELETE ON findings BEGIN
       INSERT INTO ${FINDINGS_TEXT_FTS}(${FINDINGS_TEXT_FTS}, rowid, ${cols}) VALUES ('delete', old.id, ${oldCols});
     END`,
  );
  await s.query(
    `CREATE TRIGGER findings_text_fts_update AFTER UPDATE OF ${cols} ON findings BEGIN
       INSERT INTO ${FINDINGS_TEXT_FTS}(${FINDINGS_TEXT_FTS}, rowid, ${cols}) VALUES ('delete', old.id, ${oldCols});
       INSERT INTO ${FINDINGS_TEXT_FTS}(rowid, ${cols}) VALUES (new.id, ${newCols});
     END`,
  );
  // The findings already stored.
  await s.query(`INSERT INTO ${FINDINGS_TEXT_FTS}(${FINDINGS_TEXT_FTS}) VALUES ('rebuild')`);
  await s.query(`CREATE INDEX findings_text_folded ON findings (id) WHERE ${FINDINGS_FOLDED_WHERE}`);
};

export const down: Migration = async ({ context: qi }) => {
  const s = qi.sequelize;
  if (s.getDialect() === 'postgres') {
    for (const [name] of PG_INDEXES) await s.query(`DROP INDEX IF EXISTS "${name}"`);
    return;
  }
  await s.query('DROP INDEX IF EXISTS findings_text_folded');
  for (const t of ['insert', 'delete', 'update']) await s.query(`DROP TRIGGER IF EXISTS findings_text_fts_${t}`);
  await s.query(`DROP TABLE IF EXISTS ${FINDINGS_TEXT_FTS}`);
};
