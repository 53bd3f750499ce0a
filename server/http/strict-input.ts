import type { RequestHandler } from 'express';
import { AppError } from '../errors';

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

/**
 * No text Rholog takes in may hold a NUL character: databases refuse it or
 * cut the text there. Query parameters and JSON bodies are checked here, once
 * for every route; multipart fields where the form is read.
 */
export const refuseNulBytes: RequestHandler = (req, _res, next) => {
  const inQuery = findNulByte(req.query);
  if (inQuery) return next(nulByteError('query', inQuery));
  const inBody = findNulByte(req.body);
  if (inBody) return next(nulByteError('request body', inBody));
  next();
};
