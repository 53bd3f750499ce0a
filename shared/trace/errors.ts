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
  | 'FLAT_TRACE';

/**
 * Raised for input the engine cannot read or analyse safely. `message` is
 * written for the person who uploaded the file and names the line when known.
 */
export class TraceInputError extends Error {
  readonly code: TraceInputErrorCode;
  readonly line?: number;
  readonly field?: string;

  constructor(code: TraceInputErrorCode, message: string, where: { line?: number; field?: string } = {}) {
    super(where.line !== undefined ? `line ${where.line}: ${message}` : message);
    this.name = 'TraceInputError';
    this.code = code;
    if (where.line !== undefined) this.line = where.line;
    if (where.field !== undefined) this.field = where.field;
  }
}
