import { AppError } from '../errors';

/**
 * Saving a form that sends every field (PUT) over a record someone else saved
 * after the form was opened. `basedOn` holds the values the editor started
 * from. For each field in it:
 * - nobody else changed it (stored = basedOn): the editor's value is saved;
 * - someone else changed it and the editor left it as it was (input = basedOn):
 *   their value is kept, not overwritten with the old one;
 * - both changed it to different values: refused (409 changed_meanwhile) naming
 *   each such field with the value now stored; nothing is saved.
 * Without `basedOn` the input is saved as sent (last save wins), as before.
 */
export function mergeOverStored<T extends Record<string, unknown>>(
  what: string,
  input: T,
  basedOn: Partial<Record<keyof T, unknown>> | undefined,
  stored: Record<keyof T, unknown>,
  opts: { same?: (field: keyof T, a: unknown, b: unknown) => boolean; shown?: (field: keyof T, v: unknown) => string } = {},
): T {
  if (!basedOn) return input;
  const same = opts.same ?? ((_f, a, b) => sameValue(a, b));
  const shown = opts.shown ?? ((_f, v) => shownValue(v));
  const merged: Record<string, unknown> = { ...input };
  const stale: Array<{ field: string; now: unknown; then: unknown }> = [];
  for (const field of Object.keys(basedOn) as Array<keyof T & string>) {
    if (!(field in stored)) continue;
    const then = basedOn[field];
    const now = stored[field];
    const mine = input[field];
    if (same(field, now, then) || same(field, mine, now)) continue;
    if (same(field, mine, then)) merged[field] = now;
    else stale.push({ field, now, then });
  }
  if (stale.length) {
    throw new AppError(
      409,
      'changed_meanwhile',
      `Someone else changed ${stale.map((s) => s.field).join(', ')} of ${what} after you opened it, and your change differs from theirs. Nothing was saved: open it again to see the current values, then make your change.`,
      {
        fields: stale.map((s) => ({
          field: s.field,
          message: `was changed by someone else: it is now ${shown(s.field as keyof T, s.now)}; you started from ${shown(s.field as keyof T, s.then)}`,
        })),
      },
    );
  }
  return merged as T;
}

export function sameValue(a: unknown, b: unknown): boolean {
  if (a === undefined) a = null;
  if (b === undefined) b = null;
  if (typeof a === 'string' && typeof b === 'string') return a === b;
  return JSON.stringify(a) === JSON.stringify(b);
}

function shownValue(v: unknown): string {
  if (v === null || v === undefined || v === '') return 'empty';
  if (typeof v === 'string') return `"${v.length > 80 ? `${v.slice(0, 79)}…` : v}"`;
  return JSON.stringify(v);
}
