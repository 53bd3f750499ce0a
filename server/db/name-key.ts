import type { Model, ModelStatic } from 'sequelize';
import { foldName } from '../../shared/schemas/input';

/**
 * The form of a name two rows may not share: Unicode compatibility-normalised
 * (NFKC), case-folded in every script (the database's lower() folds ASCII
 * only, so "É" and "é" or "Ω" and "ω" would pass it; lower, upper, lower again
 * also folds "ß" with "ss") and with runs of spaces as one. The schemas refuse
 * a name whose folded form is longer than the stored key (FOLDED_NAME_MAX).
 */
export const nameKey = foldName;

/**
 * Keeps a model's stored `nameKey` (column name_key, unique within its scope) equal to nameKey(name)
 * whenever the name is written: on create, on an instance's save, on bulk creates and on bulk updates.
 */
export function keepNameKey(model: ModelStatic<Model>): void {
  type Row = Model & { changed(key: string): boolean; get(key: string): unknown; set(key: string, v: unknown): void };
  const set = (row: Row) => {
    const name = row.get('name');
    if (typeof name === 'string' && (row.isNewRecord || row.changed('name'))) row.set('nameKey', nameKey(name));
  };
  const hooks = model as unknown as {
    addHook(kind: string, name: string, fn: (...args: never[]) => void): void;
    removeHook(kind: string, name: string): void;
  };
  const add = (kind: string, fn: (...args: never[]) => void) => {
    hooks.removeHook(kind, 'nameKey'); // models are initialised again in tests: one hook of each kind
    hooks.addHook(kind, 'nameKey', fn);
  };
  add('beforeValidate', (row: Row) => set(row));
  add('beforeSave', (row: Row, options: { fields?: string[] }) => {
    set(row);
    if (options.fields && row.changed('nameKey') && !options.fields.includes('nameKey')) options.fields.push('nameKey');
  });
  add('beforeBulkCreate', (rows: Row[]) => rows.forEach(set));
  add('beforeBulkUpdate', (options: { attributes?: Record<string, unknown>; fields?: string[] }) => {
    const name = options.attributes?.name;
    if (typeof name !== 'string') return;
    options.attributes!.nameKey = nameKey(name);
    if (options.fields && !options.fields.includes('nameKey')) options.fields.push('nameKey');
  });
}
