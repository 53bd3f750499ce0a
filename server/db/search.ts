import { col, fn, Op, where, type Model, type ModelStatic, type WhereOptions } from 'sequelize';

/**
 * A case-insensitive "contains" condition on one attribute that behaves the
 * same on both databases and takes what the user typed literally: % and _
 * are letters to look for, not wildcards.
 * - PostgreSQL: ILIKE with % _ and \ escaped (\ is its LIKE escape).
 * - SQLite: instr() on the lower-cased column (SQLite's LIKE has no default
 *   escape, so a typed % would match everything there). lower() folds ASCII
 *   letters only, as SQLite's LIKE does.
 */
export function containsText<M extends Model>(model: ModelStatic<M>, attribute: string, text: string): WhereOptions<M> {
  const sequelize = model.sequelize!;
  if (sequelize.getDialect() === 'postgres') {
    return { [attribute]: { [Op.iLike]: `%${text.replace(/[\\%_]/g, (ch) => `\\${ch}`)}%` } } as WhereOptions<M>;
  }
  const field = model.getAttributes()[attribute as keyof typeof model.getAttributes]?.field ?? attribute;
  return where(fn('instr', fn('lower', col(`${model.name}.${field}`)), text.toLowerCase()), Op.gt, 0) as WhereOptions<M>;
}
