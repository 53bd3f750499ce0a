/** Stable codes for input the trace reader refuses. Clients may switch on these. */
export type TraceInputErrorCode =
  | 'EMPTY_FILE'
  | 'NOT_TEXT'
  | 'FILE_TOO_LARGE'
  | 'NO_NUMERIC_ROWS'
  | 'TOO_FEW_SAMPLES'
  | 'NON_MONOTONIC_TIME'
  | 'DUPLICATE_TIME'
  | 'NOT_FINITE'
  | 'RAGGED_ROW'
  | 'EMPTY_VALUE'
  | 'NOT_A_NUMBER'
  | 'CSV_SYNTAX'
  | 'UNKNOWN_UNIT'
  | 'MISSING_TIME_UNIT'
  | 'MISSING_DISTANCE_UNIT'
  | 'MISSING_VF'
  | 'MISSING_SAMPLE_INTERVAL'
  | 'BAD_METADATA'
  | 'BAD_OPTION'
  | 'HEADER_MISMATCH'
  | 'NO_AMPLITUDE_COLUMN'
  | 'FLAT_TRACE'
  | 'LINE_TOO_LONG'
  | 'TOO_MANY_COLUMNS'
  | 'UNKNOWN_CHANNEL'
  | 'IMPLAUSIBLE_TIME_AXIS'
  | 'GLITCH_SAMPLE';

/** Longest message a TraceInputError carries, line prefix included; it is stored and shown as is. */
export const MAX_MESSAGE_CHARS = 300;
/** Longest `field` a TraceInputError carries (a column name from the file). */
export const MAX_FIELD_CHARS = 80;
/** How much of an offending value a message quotes. */
export const QUOTED_VALUE_CHARS = 40;

/**
 * Cut a value from the file short for a message: at most `max` characters,
 * ending in `…` when cut; control characters are shown as spaces so a message
 * stays on one line.
 */
export function shorten(value: string, max = QUOTED_VALUE_CHARS): string {
  // Only the head of a long value is ever looked at.
  const head = value.length > max + 1 ? value.slice(0, max + 1) : value;
  // eslint-disable-next-line no-control-regex
  const clean = head.replace(/[\u0000-\u001f\u007f]/g, ' ');
  return clean.length > max ? `${clean.slice(0, max - 1)}…` : clean;
}

/**
 * Raised for input the engine cannot read or analyse safely. `message` is
 * written for the person who uploaded the file, names the line when known,
 * and is never longer than MAX_MESSAGE_CHARS.
 */
export class TraceInputError extends Error {
  readonly code: TraceInputErrorCode;
  readonly line?: number;
  readonly field?: string;

  constructor(code: TraceInputErrorCode, message: string, where: { line?: number; field?: string } = {}) {
    super(shorten(where.line !== undefined ? `line ${where.line}: ${message}` : message, MAX_MESSAGE_CHARS));
    this.name = 'TraceInputError';
    this.code = code;
    if (where.line !== undefined) this.line = where.line;
    if (where.field !== undefined) this.field = shorten(where.field, MAX_FIELD_CHARS);
  }
}
