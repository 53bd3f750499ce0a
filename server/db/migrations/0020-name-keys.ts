import { DataTypes } from 'sequelize';
import { nameKey } from '../name-key';
import type { Migration } from './index';

/**
 * Each name as a reader sees it (`nameKey`: case folded in every script, Unicode form and runs of
 * spaces as one), stored beside the name with a unique index: sites and cable types across the
 * whole table, cable runs within their site. A new name is then checked with one index lookup
 * instead of reading every row and folding each name in the server, and two names that fold alike
 * cannot both be stored even by writers running side by side. Names stored before the check
 * folded every script could already collide; the later of such a pair keeps its name and gets a
 * key of its own (the key, "#", its id), so nothing stored is renamed or lost.
 */
const TABLES: Array<{ table: string; scope: string | null; index: string }> = [
  { table: 'sites', scope: null, index: 'sites_folded_name' },
  { table: 'cable_types', scope: null, index: 'cable_types_folded_name' },
  { table: 'cable_runs', scope: 'site_id', index: 'cable_runs_site_folded_name' },
];

export const up: Migration = async ({ context: qi }) => {
  const q = (id: string) => qi.quoteIdentifier(id);
  for (const { table, scope, index } of TABLES) {
    await qi.addColumn(table, 'name_key', { type: DataTypes.STRING(480), allowNull: true });
    const rows = (await qi.sequelize.query(`SELECT id, name${scope ? `, ${q(scope)} AS scope` : ''} FROM ${q(table)} ORDER BY id`, {
      type: 'SELECT',
    })) as Array<{ id: number; name: string; scope?: number }>;
    const seen = new Set<string>();
    for (const r of rows) {
      let key = nameKey(r.name);
      if (seen.has(`${r.scope ?? ''}|${key}`)) key = `${key}#${r.id}`;
      seen.add(`${r.scope ?? ''}|${key}`);
      await qi.sequelize.query(`UPDATE ${q(table)} SET name_key = :key WHERE id = :id`, { replacements: { key, id: r.id } });
    }
    await qi.addIndex(table, scope ? [scope, 'name_key'] : ['name_key'], { name: index, unique: true });
  }
};

export const down: Migration = async ({ context: qi }) => {
  for (const { table, index } of TABLES) {
    await qi.removeIndex(table, index);
    await qi.removeColumn(table, 'name_key');
  }
};
