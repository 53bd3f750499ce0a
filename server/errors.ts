import type { ErrorRequestHandler } from 'express';
import multer from 'multer';
import { UniqueConstraintError } from 'sequelize';
import { ZodError } from 'zod';
import { issueWords } from '../shared/schemas/issue-words';
import { capMessage } from './http/messages';

export { capMessage, MAX_MESSAGE_CHARS } from './http/messages';

export interface FieldIssue {
  field: string;
  message: string;
  line?: number;
}

/** The one error class: an HTTP status, a stable machine-readable code, a human message. */
export class AppError extends Error {
  constructor(
    public status: number,
    public code: string,
    message: string,
    public details?: { fields?: FieldIssue[]; [key: string]: unknown },
  ) {
    super(message);
  }
  static badRequest(code: string, message: string, details?: AppError['details']) {
    return new AppError(400, code, message, details);
  }
  static notFound(what: string) {
    return new AppError(404, 'not_found', `${what} was not found.`);
  }
  static forbidden(message = 'Your role does not allow this.') {
    return new AppError(403, 'forbidden', message);
  }
  static unauthenticated(message = 'Please sign in.') {
    return new AppError(401, 'unauthenticated', message);
  }
  static conflict(code: string, message: string) {
    return new AppError(409, code, message);
  }
}

/** Unknown keys of one object named at most: a body of thousands of them is not said back thousands of times. */
const UNKNOWN_KEYS_NAMED = 10;

export function zodFields(error: ZodError): FieldIssue[] {
  return error.issues.flatMap((i) =>
    // A key the input may not hold (a strict object: a list's query, a reading's fields) is named as the field,
    // one by one, rather than as "(body): Unrecognized keys: …"; past ten, the rest are counted.
    i.code === 'unrecognized_keys'
      ? [
          ...i.keys.slice(0, UNKNOWN_KEYS_NAMED).map((k) => ({ field: [...i.path, k].join('.'), message: 'is not expected here' })),
          ...(i.keys.length > UNKNOWN_KEYS_NAMED
            ? [{ field: i.path.join('.') || '(body)', message: `and ${i.keys.length - UNKNOWN_KEYS_NAMED} more fields not expected here` }]
            : []),
        ]
      : [{ field: i.path.join('.') || '(body)', message: issueWords(i) }],
  );
}

function describeFields(fields: FieldIssue[]): string {
  return fields.map((f) => `${f.field}: ${f.message}`).join('; ');
}

/**
 * True for the failures a second try can cure: SQLite's "database is locked"
 * (SQLITE_BUSY, which Sequelize reports as a TimeoutError) and PostgreSQL's
 * serialization failure (40001), deadlock (40P01) and lock-not-available (55P03).
 */
export function isBusyError(err: unknown): boolean {
  const e = err as {
    name?: string;
    code?: string;
    parent?: { code?: string };
    original?: { code?: string };
    message?: string;
  } | null;
  if (!e || typeof e !== 'object') return false;
  const code = e.parent?.code ?? e.original?.code ?? e.code;
  if (code === 'SQLITE_BUSY' || code === 'SQLITE_LOCKED' || code === '40001' || code === '40P01' || code === '55P03') return true;
  return e.name === 'SequelizeTimeoutError' || /SQLITE_BUSY|database is locked/.test(e.message ?? '');
}

/** What a write that stayed busy through every retry answers: 503, nothing changed. */
export function databaseBusy(): AppError {
  return new AppError(
    503,
    'database_busy',
    'The database is busy with other changes and this one could not be saved. Nothing was changed; try again in a moment.',
  );
}

type BodyParserError = Error & { type?: string; status?: number; expose?: boolean };

/**
 * A multipart body the form reader (busboy, under multer) could not take
 * apart: a cut-off body, a broken part header, a missing boundary. Those are
 * the sender's fault (400), unlike a disk error while saving a part.
 */
export function isMalformedMultipart(err: unknown): boolean {
  const e = err as (Error & { syscall?: string }) | null;
  if (!(e instanceof Error) || e instanceof AppError || e.syscall || err instanceof multer.MulterError) return false;
  // Made by the form reader itself: the first frame of its stack is in busboy.
  const firstFrame = (e.stack ?? '').split('\n').find((l) => l.trimStart().startsWith('at ')) ?? '';
  return (
    /[\\/]busboy[\\/]/.test(firstFrame) ||
    /^(Malformed part header|Unexpected end of (form|file)|Multipart: Boundary not found|Malformed urlencoded form)/.test(
      e.message,
    )
  );
}

const MULTER_MESSAGES: Record<string, [status: number, code: string, message: string]> = {
  LIMIT_PART_COUNT: [400, 'bad_upload', 'The form has too many parts.'],
  LIMIT_FILE_SIZE: [413, 'file_too_large', 'A file is larger than the upload limit.'],
  LIMIT_FILE_COUNT: [400, 'too_many_files', 'The form has too many files.'],
  LIMIT_FIELD_KEY: [400, 'bad_upload', 'A form field name is too long.'],
  LIMIT_FIELD_VALUE: [413, 'field_too_large', 'A form field value is too long.'],
  LIMIT_FIELD_COUNT: [400, 'bad_upload', 'The form has too many fields.'],
  LIMIT_UNEXPECTED_FILE: [400, 'bad_upload', 'The form has a file in a field that takes none.'],
  MISSING_FIELD_NAME: [400, 'bad_upload', 'A part of the form has no field name.'],
};

/** A multer limit error as an AppError whose message says which limit and which field. */
export function multerAppError(err: InstanceType<typeof multer.MulterError>): AppError {
  // A file part sent with an empty file name is read as a text field: its contents then overrun a field's limit.
  if (err.code === 'LIMIT_FIELD_VALUE' && err.field === 'file') {
    const message =
      'The file part has no file name, so it was read as text; send the trace as a file with its name (filename="trace.csv").';
    return new AppError(400, 'file_without_name', `${message} Nothing was stored.`, {
      fields: [{ field: 'file', message: 'has no file name' }],
    });
  }
  const [status, code, message] = MULTER_MESSAGES[err.code] ?? [400, 'bad_upload', 'The upload is not a valid form.'];
  const field = err.field ? capMessage(err.field, 60) : undefined;
  return new AppError(status, code, `${message}${field ? ` (field "${field}")` : ''} Nothing was stored.`, {
    ...(field ? { fields: [{ field, message }] } : {}),
  });
}

export function malformedMultipartError(err: Error): AppError {
  return AppError.badRequest(
    'malformed_form',
    `The upload is not a well-formed multipart form (${capMessage(err.message, 80)}). Nothing was stored; send the form again.`,
  );
}

/** Every error leaves as JSON { error: { code, message, fields? } }; internals stay hidden in production. */
const camel = (column: string) => column.replace(/_([a-z])/g, (_m, c: string) => c.toUpperCase());

/** A unique index's refusal as a 409 naming the fields that must differ (snake_case columns as the API's camelCase). */
export function uniqueConflict(err: UniqueConstraintError): AppError {
  // PostgreSQL names them as { column: value }, SQLite as a list of columns.
  const raw: unknown = err.fields ?? {};
  const columns = Array.isArray(raw) ? raw.map(String) : Object.keys(raw as object);
  const fields = [...new Set(columns.map((c) => camel(c.replace(/^.*\./, ''))))].filter((f) => f !== 'id');
  const list = fields.length > 0 ? fields.join(', ') : 'these values';
  return new AppError(
    409,
    'already_exists',
    `Another record already has the same ${list}; nothing was changed. Reload to see it.`,
    {
      fields: fields.map((field) => ({ field, message: 'is already used by another record' })),
    },
  );
}

/** A compressed request body that zlib could not inflate (gzip, deflate or brotli data that is not). */
function isDecompressionError(err: unknown): boolean {
  const code = (err as { code?: unknown })?.code;
  return typeof code === 'string' && (code.startsWith('Z_') || code.startsWith('ERR_BROTLI') || code.startsWith('ERR__ERROR')) && typeof (err as { status?: unknown }).status === 'number';
}

export function errorHandler(options: { exposeInternals: boolean; log?: (err: unknown) => void }): ErrorRequestHandler {
  return (err, req, res, _next) => {
    let status = 500;
    let body: { code: string; message: string; [key: string]: unknown };
    if (err instanceof AppError) {
      status = err.status;
      body = { code: err.code, message: err.message, ...(err.details ?? {}) };
    } else if (err instanceof ZodError) {
      status = 400;
      const fields = zodFields(err);
      body = { code: 'invalid_input', message: `The input is not valid: ${describeFields(fields)}`, fields };
    } else if (err instanceof multer.MulterError) {
      const e = multerAppError(err);
      status = e.status;
      body = { code: e.code, message: e.message, ...(e.details ?? {}) };
    } else if (isMalformedMultipart(err)) {
      const e = malformedMultipartError(err as Error);
      status = e.status;
      body = { code: e.code, message: e.message };
    } else if (err instanceof UniqueConstraintError) {
      // A check-then-insert that lost a race to another request (two people adding the same name at
      // once): the database's own unique index refused the second; nothing of it was stored.
      const e = uniqueConflict(err);
      status = e.status;
      body = { code: e.code, message: e.message, ...(e.details ?? {}) };
    } else if (isBusyError(err)) {
      const e = databaseBusy();
      status = e.status;
      body = { code: e.code, message: e.message };
    } else if ((err as BodyParserError)?.type === 'entity.too.large') {
      status = 413;
      body = { code: 'body_too_large', message: 'The request body is larger than the server accepts.' };
    } else if ((err as BodyParserError)?.type === 'entity.parse.failed') {
      status = 400;
      body = { code: 'invalid_json', message: 'The request body is not valid JSON.' };
    } else if ((err as BodyParserError)?.type === 'encoding.unsupported') {
      status = 415;
      body = {
        code: 'body_encoding_unsupported',
        message: `The request body's Content-Encoding "${String((err as { encoding?: string }).encoding ?? '')}" is not one the server reads: send it uncompressed, or as gzip, deflate or br.`,
      };
    } else if ((err as BodyParserError)?.type === 'charset.unsupported') {
      status = 415;
      body = { code: 'body_charset_unsupported', message: `The request body's charset "${String((err as { charset?: string }).charset ?? '')}" is not one the server reads: send UTF-8.` };
    } else if (isDecompressionError(err)) {
      status = 400;
      body = {
        code: 'body_not_decompressed',
        message: `The request body says it is compressed (Content-Encoding: ${String(req.headers['content-encoding'] ?? '')}) but it could not be decompressed (${(err as Error).message}). Send it uncompressed, or compressed whole.`,
      };
    } else if ((err as { code?: string })?.code === 'EBADCSRFTOKEN') {
      status = 403;
      body = { code: 'csrf_invalid', message: 'The form has expired or the security token is missing. Reload and try again.' };
    } else if (typeof (err as BodyParserError)?.status === 'number' && (err as BodyParserError).status! < 500) {
      status = (err as BodyParserError).status!;
      body = { code: 'bad_request', message: (err as Error).message };
    } else {
      options.log?.(err);
      body = {
        code: 'internal',
        message: options.exposeInternals ? String((err as Error)?.stack ?? err) : 'Something went wrong on the server.',
      };
    }
    body.message = capMessage(body.message);
    if (Array.isArray(body.fields))
      body.fields = (body.fields as FieldIssue[]).map((f) => ({ ...f, message: capMessage(String(f.message)) }));
    if (status === 503) res.setHeader('retry-after', '2');
    res.status(status).json({ error: body });
  };
}
