import { col, fn, Op, where, type Model, type ModelStatic, type WhereOptions } from 'sequelize';
import { nameKey } from './name-key';

/**
 * A case-insensitive "contains" condition on one attribute that behaves the
 * same on both databases and takes what the user typed literally: % and _
 * are letters to look for, not wildcards.
 * - PostgreSQL: ILIKE with % _ and \ escaped (\ is its LIKE escape).
 * - SQLite: instr() on the lower-cased column (SQLite's LIKE has no default
 *   escape, so a typed % would match everything there). lower() folds ASCII
 *   letters only, as SQLite's LIKE does; names are searched in their stored
 *   folded form instead, which folds every script.
 */
export function containsText<M extends Model>(model: ModelStatic<M>, attribute: string, text: string): WhereOptions<M> {
  const sequelize = model.sequelize!;
  // A name with its folded form stored beside it (name_key) is searched in that form, with the
  // text folded the same way: every script's case, Unicode form and runs of spaces, on both databases.
  if (attribute === 'name' && 'nameKey' in model.getAttributes()) {
    const key = nameKey(text);
    if (sequelize.getDialect() === 'postgres') {
      return { nameKey: { [Op.like]: `%${key.replace(/[\\%_]/g, (ch) => `\\${ch}`)}%` } } as unknown as WhereOptions<M>;
    }
    return where(fn('instr', col(`${model.name}.name_key`), key), Op.gt, 0) as WhereOptions<M>;
  }
  if (sequelize.getDialect() === 'postgres') {
    return { [attribute]: { [Op.iLike]: `%${text.replace(/[\\%_]/g, (ch) => `\\${ch}`)}%` } } as WhereOptions<M>;
  }
  const field = model.getAttributes()[attribute as keyof typeof model.getAttributes]?.field ?? attribute;
  return where(fn('instr', fn('lower', col(`${model.name}.${field}`)), text.toLowerCase()), Op.gt, 0) as WhereOptions<M>;
}
