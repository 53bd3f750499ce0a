import { Op, type Sequelize } from 'sequelize';

/**
 * A case-insensitive "contains" condition that behaves the same on both
 * databases: PostgreSQL's LIKE is case-sensitive (so ILIKE there), SQLite's
 * is not for ASCII. PostgreSQL takes \ as LIKE's escape, so % and _ typed by a
 * user are escaped there; SQLite has no default escape, where they only widen
 * the search.
 */
export function containsText(sequelize: Sequelize, text: string) {
  if (sequelize.getDialect() === 'postgres') {
    return { [Op.iLike]: `%${text.replace(/[\\%_]/g, (ch) => `\\${ch}`)}%` };
  }
  return { [Op.like]: `%${text}%` };
}
