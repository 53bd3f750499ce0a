import { z } from 'zod';

/**
 * Numbers as they arrive from outside, read strictly.
 *
 * JSON bodies carry real numbers: schemas for them use `z.number()` (never
 * `z.coerce`), so "", true, [45] and "45" are refused rather than read as 0,
 * 1 and 45. Query strings, path parameters and multipart form fields carry
 * only text: the helpers below read that text as plain decimal digits, so
 * "0x10", "1e999", " 7" and "" are refused rather than read as 16,
 * Infinity, 7 and 0.
 */

/** The longest run a length may describe: 100 km of cable (common practice for a single TDR shot is far less). */
export const MAX_LENGTH_M = 100_000;

const WHOLE = /^-?\d{1,15}$/;

/**
 * A query string or form that gives one field twice (`?page=1&page=2`, two `vfOverride` parts) arrives as a list:
 * said as such, not as a number that is not written in digits.
 */
export const GIVEN_MORE_THAN_ONCE = 'was given more than once; give it once';

/** The message for a field that arrived as a list (given twice, or as `field[]`) rather than as one value, or null. */
export function notOneValue(v: unknown): string | null {
  if (Array.isArray(v)) return v.length > 1 ? GIVEN_MORE_THAN_ONCE : 'must be given once, as plain text (not as a list such as field[])';
  if (v !== null && typeof v === 'object') return 'must be given once, as plain text (not with a bracketed part such as field[x])';
  return null;
}

/**
 * The fields of a query string or form that do not hold one plain value, with what is wrong with each (no value is
 * repeated in the messages: they may be long or hostile).
 */
export function repeatedFields(fields: unknown): Array<{ field: string; message: string }> {
  if (fields === null || typeof fields !== 'object' || Array.isArray(fields)) return [];
  return Object.entries(fields).flatMap(([field, v]) => {
    const message = notOneValue(v);
    return message ? [{ field, message }] : [];
  });
}
const DECIMAL = /^[-+]?(\d{1,20}(\.\d{0,20})?|\.\d{1,20})([eE][-+]?\d{1,3})?$/;

interface Bounds {
  min?: number;
  max?: number;
  /** The value's description in messages, e.g. "a page number". */
  what?: string;
}

function bounded(schema: z.ZodNumber, b: Bounds): z.ZodNumber {
  let s = schema;
  if (b.min !== undefined) s = s.min(b.min, { error: `must be ${b.min} or more` });
  if (b.max !== undefined) s = s.max(b.max, { error: `must be at most ${b.max}` });
  return s;
}

/** A whole number written in a query string or path: digits only (a number is taken as is, for calls from code). */
export function textInt(b: Bounds = {}) {
  const what = b.what ?? 'a whole number';
  return z
    .unknown()
    .transform((v, ctx) => {
      if (typeof v === 'number') return v;
      if (typeof v === 'string' && WHOLE.test(v)) return Number(v);
      ctx.addIssue({ code: 'custom', message: notOneValue(v) ?? `must be ${what}, written in digits` });
      return z.NEVER;
    })
    .pipe(bounded(z.number().int({ error: `must be ${what}` }), b));
}

/**
 * The largest id a row can have: ids are `integer` columns (2^31 − 1 on PostgreSQL). A larger one names no row, and
 * PostgreSQL refuses it outright as a value bound to such a column (out of range), so it is refused here, on every
 * database alike.
 */
export const MAX_ID = 2_147_483_647;

/** A positive id in a query string or path. */
export const textId = (what = 'a positive id') => textInt({ min: 1, max: MAX_ID, what });

/** A decimal number written in a query string: digits with an optional sign, point and exponent, finite ("0x10", "", "1e999" are refused). */
export function textNumber(b: Bounds = {}) {
  const what = b.what ?? 'a number';
  return z
    .unknown()
    .transform((v, ctx) => {
      if (typeof v === 'number' && Number.isFinite(v)) return v;
      if (typeof v === 'string' && DECIMAL.test(v) && Number.isFinite(Number(v))) return Number(v);
      ctx.addIssue({ code: 'custom', message: notOneValue(v) ?? `must be ${what}, written in digits` });
      return z.NEVER;
    })
    .pipe(bounded(z.number(), b));
}

/**
 * A decimal number in a multipart form field: digits with an optional point
 * and exponent, finite. An empty field means "not given".
 */
export function formNumber(b: Bounds = {}) {
  const what = b.what ?? 'a number';
  return z
    .unknown()
    .transform((v, ctx) => {
      if (v === '' || v === undefined || v === null) return undefined;
      if (typeof v === 'number' && Number.isFinite(v)) return v;
      const finite = typeof v === 'string' && DECIMAL.test(v.trim());
      if (finite && Number.isFinite(Number(v))) return Number(v);
      const repeated = notOneValue(v);
      if (repeated) {
        ctx.addIssue({ code: 'custom', message: repeated });
        return z.NEVER;
      }
      ctx.addIssue({ code: 'custom', message: finite ? `must be ${what} of a sensible size (this one is too large to hold)` : `must be ${what}, written in digits` });
      return z.NEVER;
    })
    .pipe(bounded(z.number({ error: `must be ${what}` }), b).optional())
    .optional();
}

/** A positive id in a JSON body: a real whole number. */
export const jsonId = (message = 'must be a positive id') =>
  z.number({ error: message }).int({ error: message }).positive({ error: message }).max(MAX_ID, { error: `${message} (at most ${MAX_ID})` });

/** A length in metres in a JSON body: a real number from 0 (or above, when `positive`) to 100 km. */
export function lengthM(what: string, opts: { positive?: boolean; max?: number } = {}) {
  const max = opts.max ?? MAX_LENGTH_M;
  const rule = `${what} must be ${opts.positive ? 'more than 0' : '0 or more'} and at most ${max.toLocaleString('en-GB')} m`;
  const n = z.number({ error: `${what} must be a number of metres` }).max(max, { error: rule });
  return opts.positive ? n.positive({ error: rule }) : n.min(0, { error: rule });
}

/** Line breaks and other control characters: C0 (tab, CR, LF among them), DEL, C1 (NEL among them), and the Unicode line and paragraph separators. */
// eslint-disable-next-line no-control-regex -- finding control characters is the point
const NOT_ONE_LINE = /[\u0000-\u001F\u007F-\u009F\u2028\u2029]/;

/**
 * A name, title or label: one line of text. Each is shown after its label on
 * a line of its own (lists, crew sheets, the plain-text e-mails), so a line
 * break inside one would print a line Rholog never wrote. Notes, comments and
 * reasons are not one-line fields and keep their line breaks.
 */
export function oneLine<T extends z.ZodType<string | null | undefined>>(schema: T): T {
  return schema.refine((v) => typeof v !== 'string' || !NOT_ONE_LINE.test(v), {
    error: 'must be one line: no line breaks, tabs or other control characters',
  }) as T;
}

/**
 * Control characters a note, comment or reason may not hold: C0 other than tab, line feed and carriage return
 * (a bell, a backspace, an escape that starts a terminal sequence, a form feed), DEL and C1. They show as nothing or as
 * boxes on screen, can rewrite what a terminal or a plain-text e-mail reader shows, and no keyboard types them: they
 * come from a paste of binary or a hostile client.
 */
// eslint-disable-next-line no-control-regex -- finding control characters is the point
const NOT_TEXT = /[\u0000-\u0008\u000B\u000C\u000E-\u001F\u007F-\u009F]/;

/**
 * A note, comment or reason: text of several lines. Line breaks (LF, CR LF) and tabs are kept; other control
 * characters are refused, naming the first one and where it is.
 */
export function multiLine<T extends z.ZodType<string | null | undefined>>(schema: T): T {
  return schema.superRefine((v, ctx) => {
    if (typeof v !== 'string') return;
    const at = v.search(NOT_TEXT);
    if (at < 0) return;
    const code = `U+${v.codePointAt(at)!.toString(16).toUpperCase().padStart(4, '0')}`;
    ctx.addIssue({
      code: 'custom',
      message: `must not contain control characters (${code} at character ${at + 1}); only line breaks and tabs are kept`,
    });
  }) as unknown as T;
}

/**
 * Characters that draw nothing (Unicode's default-ignorable code points: zero-width space U+200B, word joiner U+2060,
 * soft hyphen U+00AD, variation selectors, tags …). A name that differs from another only by them looks the same on
 * every screen and in every e-mail, so its key leaves them out.
 */
const INVISIBLE = /\p{Default_Ignorable_Code_Point}/gu;

/**
 * The form of a name two rows may not share (stored as name_key): without characters that draw nothing, Unicode
 * compatibility-normalised (NFKC), case-folded in every script (lower, upper, lower again also folds "ß" with "ss")
 * and with runs of spaces as one.
 */
export function foldName(name: string): string {
  return name.replace(INVISIBLE, '').normalize('NFKC').replace(INVISIBLE, '').toLowerCase().toUpperCase().toLowerCase().replace(/\s+/g, ' ').trim();
}

/** The longest folded name the stored key holds (its column is 480 characters long). */
export const FOLDED_NAME_MAX = 480;

/**
 * A name whose folded form fits its stored key. A few characters stand for many when written out in full
 * (U+FDFA for 18, "ß" for 2), so a name within its own length limit can fold to more than the key holds.
 */
export function foldedNameFits<T extends z.ZodType<string>>(schema: T): T {
  return schema.superRefine((v, ctx) => {
    const n = foldName(v).length;
    if (n === 0 && v.length > 0) {
      ctx.addIssue({ code: 'custom', message: 'must have a visible character: it holds only characters that draw nothing (such as U+200B)' });
      return;
    }
    if (n > FOLDED_NAME_MAX) {
      ctx.addIssue({
        code: 'custom',
        message: `is too long once written out in full: its characters stand for ${n} letters and signs, at most ${FOLDED_NAME_MAX}`,
      });
    }
  }) as unknown as T;
}

const TYPE_WORDS: Record<string, string> = {
  string: 'text',
  number: 'a number',
  int: 'a whole number',
  boolean: 'true or false',
  array: 'a list',
  object: 'an object',
};

/**
 * The error of a field that must be given: `message` ("is required", "is required: say why") when it is missing
 * (absent or null), and what it must be when it is there as something else — {"comment": 7} is told "must be
 * text", not "is required". Checks chained on the field (min, max, …) keep their own messages.
 */
export function required(message: string) {
  return (iss: { code?: string; input?: unknown; expected?: string; values?: readonly unknown[] }) => {
    if (iss.input === undefined || iss.input === null) return message;
    if (iss.code === 'invalid_type') return `must be ${TYPE_WORDS[iss.expected ?? ''] ?? iss.expected}`;
    if (iss.code === 'invalid_value' && iss.values) return `must be one of ${iss.values.map(String).join(', ')}`;
    return message;
  };
}

/** A free-text note of at most `max` characters: trimmed, kept with its line breaks and tabs, empty or absent read as null. */
export const optionalNote = (max: number) =>
  multiLine(
    z
      .string()
      .trim()
      .max(max, `must be at most ${max} characters`)
      .nullish()
      .transform((v) => (v ? v : null)),
  );
