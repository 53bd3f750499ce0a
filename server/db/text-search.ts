import { literal, type ModelStatic, type Model } from 'sequelize';
import type { Literal } from 'sequelize/lib/utils';

/** A LIKE pattern matching `text` anywhere, with %, _ and the escape character taken literally. */
export function containsPattern(text: string): string {
  return `%${text.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
}

/**
 * A condition for rows whose text columns contain `text`, case-insensitively,
 * in SQLite and PostgreSQL alike (SQLite folds ASCII letters only). The match runs in a sub-query on the table's
 * ids, answered from an index holding the columns (no whole rows read); the
 * unary plus keeps the id test from driving the query, so a list still walks
 * its sort index and stops at the end of the page.
 */
export function idsContaining<M extends Model>(model: ModelStatic<M>, columns: string[], text: string): Literal {
  const sequelize = model.sequelize!;
  const qi = sequelize.getQueryInterface();
  const pattern = sequelize.escape(containsPattern(text));
  const table = model.getTableName() as string;
  // SQLite's LIKE already ignores ASCII case; PostgreSQL's ILIKE does. No lower() per row.
  const like = sequelize.getDialect() === 'postgres' ? 'ILIKE' : 'LIKE';
  const tests = columns.map((c) => `${qi.quoteIdentifier(c)} ${like} ${pattern} ESCAPE '\\'`);
  return literal(`+${qi.quoteIdentifier(model.name)}.${qi.quoteIdentifier('id')} IN (SELECT ${qi.quoteIdentifier('id')} FROM ${qi.quoteIdentifier(table)} WHERE ${tests.join(' OR ')})`);
}
