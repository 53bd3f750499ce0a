/** Stable codes for readings the location methods refuse. Clients may switch on these. */
export type LocateInputErrorCode =
  'NOT_A_NUMBER' | 'OUT_OF_RANGE' | 'MISSING' | 'BEYOND_CABLE' | 'BAD_SECTIONS' | 'UNKNOWN_CONDUCTOR' | 'SAME_INFORMATION';

/**
 * A reading that cannot give a location: a bridge ratio outside 0–1, a
 * capacitance above the whole cable's, a location beyond the cable. `field`
 * names the reading (for a form or a command-line option); `message` is
 * written for the technician who entered it.
 */
export class LocateInputError extends Error {
  readonly code: LocateInputErrorCode;
  readonly field: string;

  constructor(code: LocateInputErrorCode, field: string, message: string) {
    super(message);
    this.name = 'LocateInputError';
    this.code = code;
    this.field = field;
  }
}

/** A finite number, or a LocateInputError naming the field. */
export function finite(field: string, value: number | undefined, what: string): number {
  if (value === undefined || value === null) throw new LocateInputError('MISSING', field, `${what} (${field}) is missing`);
  if (typeof value !== 'number' || !Number.isFinite(value))
    throw new LocateInputError('NOT_A_NUMBER', field, `${what} (${field}) must be a number, got ${String(value)}`);
  return value;
}

export function positive(field: string, value: number | undefined, what: string): number {
  const v = finite(field, value, what);
  if (!(v > 0)) throw new LocateInputError('OUT_OF_RANGE', field, `${what} (${field}) must be more than zero, got ${v}`);
  return v;
}

export function nonNegative(field: string, value: number | undefined, what: string): number {
  const v = finite(field, value, what);
  if (!(v >= 0)) throw new LocateInputError('OUT_OF_RANGE', field, `${what} (${field}) cannot be negative, got ${v}`);
  return v;
}
