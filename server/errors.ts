import type { ErrorRequestHandler } from 'express';
import multer from 'multer';
import { ZodError } from 'zod';

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

export function zodFields(error: ZodError): FieldIssue[] {
  return error.issues.map((i) => ({ field: i.path.join('.') || '(body)', message: i.message }));
}

function describeFields(fields: FieldIssue[]): string {
  return fields.map((f) => `${f.field}: ${f.message}`).join('; ');
}

type BodyParserError = Error & { type?: string; status?: number; expose?: boolean };

/** Every error leaves as JSON { error: { code, message, fields? } }; internals stay hidden in production. */
export function errorHandler(options: { exposeInternals: boolean; log?: (err: unknown) => void }): ErrorRequestHandler {
  return (err, _req, res, _next) => {
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
      status = err.code === 'LIMIT_FILE_SIZE' ? 413 : 400;
      body = {
        code: err.code === 'LIMIT_FILE_SIZE' ? 'file_too_large' : 'bad_upload',
        message:
          err.code === 'LIMIT_FILE_SIZE'
            ? `The file ${err.field ? `in field "${err.field}" ` : ''}is larger than the upload limit.`
            : `The upload is not valid (${err.message}${err.field ? `, field "${err.field}"` : ''}).`,
        ...(err.field ? { fields: [{ field: err.field, message: err.message }] } : {}),
      };
    } else if ((err as BodyParserError)?.type === 'entity.too.large') {
      status = 413;
      body = { code: 'body_too_large', message: 'The request body is larger than the server accepts.' };
    } else if ((err as BodyParserError)?.type === 'entity.parse.failed') {
      status = 400;
      body = { code: 'invalid_json', message: 'The request body is not valid JSON.' };
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
    res.status(status).json({ error: body });
  };
}
