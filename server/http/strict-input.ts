import type { RequestHandler } from 'express';
import { repeatedFields } from '../../shared/schemas/input';
import { AppError, capMessage } from '../errors';

/** The path of the first string holding a NUL character (U+0000), or null. */
export function findNulByte(value: unknown, path = '', depth = 0): string | null {
  if (typeof value === 'string') return value.includes('\0') ? path || '(value)' : null;
  if (depth > 20 || value === null || typeof value !== 'object') return null;
  for (const [key, v] of Object.entries(value)) {
    const here = path ? `${path}.${key}` : key;
    if (key.includes('\0')) return here;
    const found = findNulByte(v, here, depth + 1);
    if (found) return found;
  }
  return null;
}

export function nulByteError(where: string, field: string): AppError {
  const name = field.replace(/\0/g, '\\0').slice(0, 60);
  return AppError.badRequest('nul_byte', `The ${where} has a NUL character (\\0) in "${name}". Remove it and send again.`, {
    fields: [{ field: name, message: 'must not contain a NUL character' }],
  });
}

/** Half of a UTF-16 surrogate pair standing alone: no character at all, and not storable as UTF-8. */
const LONE_SURROGATE = /[\uD800-\uDBFF](?![\uDC00-\uDFFF])|(?<![\uD800-\uDBFF])[\uDC00-\uDFFF]/;

/** The path of the first string (or key) holding a lone UTF-16 surrogate, such as "\ud800" in JSON, or null. */
export function findLoneSurrogate(value: unknown, path = '', depth = 0): string | null {
  if (typeof value === 'string') return LONE_SURROGATE.test(value) ? path || '(value)' : null;
  if (depth > 20 || value === null || typeof value !== 'object') return null;
  for (const [key, v] of Object.entries(value)) {
    const here = path ? `${path}.${key}` : key;
    if (LONE_SURROGATE.test(key)) return here.replace(new RegExp(LONE_SURROGATE.source, 'g'), '\uFFFD');
    const found = findLoneSurrogate(v, here, depth + 1);
    if (found) return found;
  }
  return null;
}

export function loneSurrogateError(where: string, field: string): AppError {
  const name = field.slice(0, 60);
  return AppError.badRequest('broken_text', `The ${where} has a broken character in "${name}" (half of a UTF-16 surrogate pair, which is not a character). Retype the text and send again.`, {
    fields: [{ field: name, message: 'must be valid text: it holds half of a UTF-16 surrogate pair' }],
  });
}

/**
 * Explicit bidirectional embeddings, overrides and isolates (U+202A–U+202E,
 * U+2066–U+2069): they make text display in an order other than the one
 * stored, so a name, title or file name could read as something else in a
 * list, an e-mail or a crew sheet (CVE-2021-42574 describes the attack on
 * source code). Ordinary right-to-left text needs none of them.
 */
const BIDI_CONTROL = /[\u202A-\u202E\u2066-\u2069]/;

export function findBidiControl(value: unknown, path = '', depth = 0): string | null {
  if (typeof value === 'string') return BIDI_CONTROL.test(value) ? path || '(value)' : null;
  if (depth > 20 || value === null || typeof value !== 'object') return null;
  for (const [key, v] of Object.entries(value)) {
    const here = path ? `${path}.${key}` : key;
    if (BIDI_CONTROL.test(key)) return here.replace(new RegExp(BIDI_CONTROL.source, 'g'), '\uFFFD');
    const found = findBidiControl(v, here, depth + 1);
    if (found) return found;
  }
  return null;
}

export function bidiControlError(where: string, field: string): AppError {
  const name = field.slice(0, 60);
  return AppError.badRequest('hidden_direction_mark', `The ${where} has a hidden text-direction control in "${name}", which would make the text show in another order than it is stored. Retype the text and send again.`, {
    fields: [{ field: name, message: 'must not contain text-direction controls (U+202A–U+202E, U+2066–U+2069)' }],
  });
}

/**
 * A query string or a form (url-encoded or multipart) gives each field once: `?limit=1&limit=2` or two `vf` parts
 * arrive as a list, which no field takes, and were refused as "not written in digits" or "expected string". Said as
 * what it is, naming the field; JSON bodies are not checked here (their lists are real lists).
 */
export function repeatedFieldError(where: 'query' | 'form', fields: unknown): AppError | null {
  const found = repeatedFields(fields).map((f) => ({ field: capMessage(f.field, 60), message: f.message }));
  if (!found.length) return null;
  return AppError.badRequest('invalid_input', `The ${where} is not valid: ${found.map((f) => `${f.field}: ${f.message}`).join('; ')}`, { fields: found });
}

export const refuseRepeatedFields: RequestHandler = (req, _res, next) => {
  const inQuery = repeatedFieldError('query', req.query);
  if (inQuery) return next(inQuery);
  if (req.is('application/x-www-form-urlencoded')) return next(repeatedFieldError('form', req.body) ?? undefined);
  next();
};

/**
 * No text Rholog takes in may hold a NUL character (databases refuse it or
 * cut the text there) or a lone UTF-16 surrogate (no character; it cannot be
 * stored as UTF-8 and comes back as something else). Query parameters and
 * JSON bodies are checked here, once for every route; multipart fields where
 * the form is read.
 */
export const refuseNulBytes: RequestHandler = (req, _res, next) => {
  const inQuery = findNulByte(req.query);
  if (inQuery) return next(nulByteError('query', inQuery));
  const inBody = findNulByte(req.body);
  if (inBody) return next(nulByteError('request body', inBody));
  const brokenQuery = findLoneSurrogate(req.query);
  if (brokenQuery) return next(loneSurrogateError('query', brokenQuery));
  const brokenBody = findLoneSurrogate(req.body);
  if (brokenBody) return next(loneSurrogateError('request body', brokenBody));
  const bidiQuery = findBidiControl(req.query);
  if (bidiQuery) return next(bidiControlError('query', bidiQuery));
  const bidiBody = findBidiControl(req.body);
  if (bidiBody) return next(bidiControlError('request body', bidiBody));
  next();
};

/**
 * The same checks for the text fields of a multipart form, which the form
 * reader (multer) fills in only after `refuseNulBytes` and `refuseRepeatedFields`
 * have run: put it right after the form reader of a route.
 */
export const refuseBadFormText: RequestHandler = (req, _res, next) => next(repeatedFieldError('form', req.body) ?? textTrouble('form', req.body) ?? undefined);

/** The first NUL, lone surrogate or direction control in a value (e.g. JSON read out of a form field), as the error to answer with. */
export function textTrouble(where: string, value: unknown): AppError | null {
  const nul = findNulByte(value);
  if (nul) return nulByteError(where, nul);
  const broken = findLoneSurrogate(value);
  if (broken) return loneSurrogateError(where, broken);
  const bidi = findBidiControl(value);
  if (bidi) return bidiControlError(where, bidi);
  return null;
}

/**
 * An uploaded file's name as its sender wrote it: multipart sends it as UTF-8
 * bytes that the form reader hands over as Latin-1. Text-direction controls
 * are dropped (a phone user cannot easily rename a file, and they would make
 * "cdb.csv" show as another name in the lists), and so are other control
 * characters.
 */
export function uploadedFileName(originalname: string): string {
  return (
    Buffer.from(originalname, 'latin1')
      .toString('utf8')
      // eslint-disable-next-line no-control-regex
      .replace(/[\u0000-\u001F\u007F\u202A-\u202E\u2066-\u2069]/g, '')
  );
}

/**
 * A file upload (multipart/form-data) is read as it arrives, uncompressed: the form reader does not undo a
 * Content-Encoding. A compressed form would otherwise be refused as "not well-formed", and a form labelled
 * compressed but sent plain would be stored as if the label were true; both are a 415 that says what to send.
 */
export const refuseEncodedForms: RequestHandler = (req, _res, next) => {
  const encoding = String(req.headers['content-encoding'] ?? '').trim().toLowerCase();
  if (!encoding || encoding === 'identity' || !req.is('multipart/form-data')) return next();
  next(
    new AppError(
      415,
      'body_encoding_unsupported',
      `A file upload (multipart/form-data) is read uncompressed, and this one says Content-Encoding "${encoding}": send the form without Content-Encoding. Nothing was stored.`,
      { fields: [{ field: 'Content-Encoding', message: 'must be absent (or identity) on a file upload' }] },
    ),
  );
};

/**
 * A request body in a type the server does not read (text/plain, text/csv, XML …) would reach the
 * route as no body at all and be refused for its missing fields; say what is wrong instead: 415
 * naming the type and what to send. Requests without a body pass.
 */
export const refuseUnreadBodies: RequestHandler = (req, _res, next) => {
  if (req.headers['content-length'] === '0') return next(); // an empty body, whatever its type
  const read = req.is(['application/json', 'application/x-www-form-urlencoded', 'multipart/form-data']);
  if (read === null || read !== false) return next(); // null: no body
  const type = String(req.headers['content-type'] ?? '').split(';')[0].trim() || 'no Content-Type';
  next(
    new AppError(
      415,
      'body_type_unsupported',
      `The request body is sent as "${type}", which the server does not read: send JSON with Content-Type: application/json (a file upload as multipart/form-data). Nothing was stored.`,
      { fields: [{ field: 'Content-Type', message: 'must be application/json, or multipart/form-data for a file upload' }] },
    ),
  );
};
