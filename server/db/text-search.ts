import { literal, Op, type Sequelize, type WhereOptions } from 'sequelize';

/** A LIKE pattern matching `text` anywhere, with %, _ and the escape character taken literally. */
export function containsPattern(text: string): string {
  return `%${text.toLowerCase().replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
}

/**
 * Rows whose text columns contain `text`, case-insensitively, in SQLite and
 * PostgreSQL alike. The match runs in a sub-query on the table's own ids so the
 * database can answer it from an index holding the columns (no whole rows read).
 */
export function idsContaining(sequelize: Sequelize, table: string, columns: string[], text: string): WhereOptions {
  const qi = sequelize.getQueryInterface();
  const pattern = sequelize.escape(containsPattern(text));
  const tests = columns.map((c) => `lower(coalesce(${qi.quoteIdentifier(c)}, '')) LIKE ${pattern} ESCAPE '\\'`);
  return { id: { [Op.in]: literal(`(SELECT id FROM ${qi.quoteIdentifier(table)} WHERE ${tests.join(' OR ')})`) } };
}
