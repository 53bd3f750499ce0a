import { literal, type ModelStatic, type Model } from 'sequelize';
import type { Literal } from 'sequelize/lib/utils';

/** A LIKE pattern matching `text` anywhere, with %, _ and the escape character taken literally. */
export function containsPattern(text: string): string {
  return `%${text.toLowerCase().replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
}

/**
 * A condition for rows whose text columns contain `text`, case-insensitively,
 * in SQLite and PostgreSQL alike. The match runs in a sub-query on the table's
 * ids, answered from an index holding the columns (no whole rows read); the
 * unary plus keeps the id test from driving the query, so a list still walks
 * its sort index and stops at the end of the page.
 */
export function idsContaining<M extends Model>(model: ModelStatic<M>, columns: string[], text: string): Literal {
  const sequelize = model.sequelize!;
  const qi = sequelize.getQueryInterface();
  const pattern = sequelize.escape(containsPattern(text));
  const table = model.getTableName() as string;
  const tests = columns.map((c) => `lower(coalesce(${qi.quoteIdentifier(c)}, '')) LIKE ${pattern} ESCAPE '\\'`);
  return literal(`+${qi.quoteIdentifier(model.name)}.${qi.quoteIdentifier('id')} IN (SELECT ${qi.quoteIdentifier('id')} FROM ${qi.quoteIdentifier(table)} WHERE ${tests.join(' OR ')})`);
}
