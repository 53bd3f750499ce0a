/**
 * Reading the numeric body of a trace file: plain rows of numbers after the
 * header, straight from the file's bytes. Two readers give the same result:
 *  - a single pass over the bytes, used for plain rows (digits, signs,
 *    exponent, one decimal mark, delimiter, numbers in double quotes): no string per line or per
 *    number, and the numbers go straight into the Float64Arrays the trace
 *    keeps. It declines (returns null) at anything else, so it never has to
 *    be right about quoting rules;
 *  - the general reader, csv-parse (browser build, which carries its own
 *    Buffer shim, so it runs on the server and in the browser), for quoted
 *    fields, stray characters and anything the single pass declines. Before
 *    it decodes anything it checks every line's length in one bounded pass,
 *    so a hostile line is refused after MAX_DATA_LINE_BYTES, never copied.
 * Both report a bad row with the same code and line number, and both are
 * linear in the size of the file.
 */
import { parse as csvParse } from 'csv-parse/browser/esm/sync';
import { csvTrouble, unclosedQuoteLine } from './csv-trouble';
import { shorten, TraceInputError } from './errors';
import { decodeText, lineTooLong, MAX_DATA_LINE_BYTES } from './lines';

export type Delimiter = ',' | ';' | '\t' | 'whitespace' | null;

export interface BodySpec {
  bytes: Uint8Array;
  /** Offset in `bytes` where the body starts (start of a line). */
  start: number;
  /** 1-based file line number of the line at `start`. */
  firstLine: number;
  delimiter: Delimiter;
  decimalComma: boolean;
  columnCount: number;
  /** Columns to keep, by position. */
  keep: number[];
  /** A factor for each kept column (its unit), applied as each value is stored; 1 when absent. */
  scales?: number[];
  columnNames: string[];
  /** Size hint for the arrays. */
  rowEstimate: number;
}

export interface BodyColumns {
  columns: Float64Array[];
  rows: number;
  /** File line of each kept row is not stored; the first and last are. */
  firstRowLine: number;
  lastRowLine: number;
  /** Line number of row i, computed on demand (kept sparse for memory). */
  lineOfRow: (row: number) => number;
  reader: 'fast' | 'csv-parse';
}

const POW10 = [
  1, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22,
];

const NON_FINITE = /^[+-]?(nan|inf|infinity|∞)$/i;
/**
 * SCPI instruments write +9.9E37 for a reading over range, -9.9E37 under it and 9.91E37 for no reading
 * (SCPI 1999, common practice): these values in a column that is read are codes, not measurements.
 */
export function isOverRangeCode(v: number): boolean {
  const a = Math.abs(v);
  return a === 9.9e37 || a === 9.91e37;
}
// One way to match each number, so a long run of digits is never backtracked over.
const NUMBER = /^[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?$/;

/** How a column is named in messages: its header in quotes, or its 1-based position. */
export function columnLabel(names: string[], col: number): string {
  const name = names[col];
  return name ? `'${shorten(name)}'` : `${col + 1}`;
}

/** Convert one field to a number or throw the error a person can act on. */
export function numberFromField(raw: string, decimalComma: boolean, line: number, column: string): number {
  let s = raw.trim();
  if (s.length >= 2 && (s[0] === '"' || s[0] === "'") && s[s.length - 1] === s[0]) s = s.slice(1, -1).trim();
  if (s === '') throw new TraceInputError('EMPTY_VALUE', `column ${column} is empty; expected a number`, { line, field: column });
  if (decimalComma) s = s.replace(',', '.');
  const shown = shorten(raw.trim());
  if (NUMBER.test(s)) {
    const v = Number(s);
    if (Number.isFinite(v)) return v;
    throw new TraceInputError('NOT_FINITE', `value '${shown}' in column ${column} is out of range; expected a finite number`, {
      line,
      field: column,
    });
  }
  if (NON_FINITE.test(s)) {
    throw new TraceInputError(
      'NOT_FINITE',
      `value '${shown}' in column ${column} is not a finite number; expected a measured value`,
      { line, field: column },
    );
  }
  throw new TraceInputError('NOT_A_NUMBER', `'${shown}' in column ${column} is not a number`, { line, field: column });
}

function raggedError(spec: BodySpec, got: number, line: number): TraceInputError {
  return new TraceInputError(
    'RAGGED_ROW',
    `row has ${got} value${got === 1 ? '' : 's'}; expected ${spec.columnCount} like the rows above`,
    { line },
  );
}

/** Line numbers of rows, stored only where a row is not on the next line (blank or comment lines skipped). */
class LineMap {
  private jumpsRow: number[] = [];
  private jumpsLine: number[] = [];
  constructor(private readonly firstLine: number) {}
  note(row: number, line: number, expected: number) {
    if (line !== expected) {
      this.jumpsRow.push(row);
      this.jumpsLine.push(line);
    }
  }
  lineOf(row: number): number {
    let lo = 0;
    let hi = this.jumpsRow.length - 1;
    let best = -1;
    while (lo <= hi) {
      const mid = (lo + hi) >> 1;
      if (this.jumpsRow[mid] <= row) {
        best = mid;
        lo = mid + 1;
      } else hi = mid - 1;
    }
    if (best < 0) return this.firstLine + row;
    return this.jumpsLine[best] + (row - this.jumpsRow[best]);
  }
}

/**
 * The columns kept so far, with the line of every row; both readers fill the
 * same store. Values are written by row, so a row abandoned half-way is
 * simply written over by the next one.
 */
export class RowStore {
  /** One array per kept column, with room for `capacity` rows. */
  data: Float64Array[];
  readonly lines: LineMap;
  rows = 0;
  firstRowLine = -1;
  lastRowLine = -1;
  constructor(private readonly spec: BodySpec) {
    const capacity = Math.max(16, spec.rowEstimate);
    this.data = spec.keep.map(() => new Float64Array(capacity));
    this.lines = new LineMap(spec.firstLine);
  }
  get capacity(): number {
    return this.data[0].length;
  }
  /** Double the room when the estimate was short (one copy). */
  grow() {
    this.data = this.data.map((d) => {
      const next = new Float64Array(d.length * 2);
      next.set(d);
      return next;
    });
  }
  /** A row has been read in full from `line`. */
  endRow(line: number) {
    this.lines.note(this.rows, line, this.spec.firstLine + this.rows);
    if (this.firstRowLine < 0) this.firstRowLine = line;
    this.lastRowLine = line;
    this.rows++;
  }
  result(reader: BodyColumns['reader']): BodyColumns {
    const rows = this.rows;
    return {
      // A view of the rows read, not a copy.
      columns: this.data.map((d) => (rows === d.length ? d : d.subarray(0, rows))),
      rows,
      firstRowLine: this.firstRowLine,
      lastRowLine: this.lastRowLine,
      lineOfRow: (r) => this.lines.lineOf(r),
      reader,
    };
  }
}

/** Where the one-pass reader stopped: the start of the line it declined. */
export interface Resume {
  pos: number;
  line: number;
}

/** A number the one-pass reader could not convert exactly itself (over 15 digits, or a large exponent). */
function slowNumber(b: Uint8Array, from: number, to: number, decimalComma: boolean): number {
  let s = String.fromCharCode(...b.subarray(from, to));
  if (decimalComma) s = s.replace(',', '.');
  return Number(s);
}

const END = -1;
const LF = 10;
const CR = 13;

/**
 * One pass over the bytes into `store`. Returns null when it has read the
 * whole body, or the line where it met anything but plain numeric rows, for
 * the general reader to go on from. Every read is bounded by the current
 * line's limit, so a line longer than MAX_DATA_LINE_BYTES is refused at that
 * point. The number loop is kept in one function on purpose: it is the hot
 * path of every upload.
 */
export function readBodyFast(spec: BodySpec, store: RowStore): Resume | null {
  const { bytes: b, delimiter, decimalComma, columnCount } = spec;
  const n = b.length;
  // A local copy: an imported binding may be read through a getter on every use.
  const maxLine = MAX_DATA_LINE_BYTES;
  const dCode = delimiter === ',' ? 44 : delimiter === ';' ? 59 : delimiter === '\t' ? 9 : -2;
  const ws = delimiter === 'whitespace';
  // With decimal commas a point is accepted too, as the general reader does.
  const decCode = decimalComma ? 44 : 46;
  const keepSlot = new Int32Array(columnCount).fill(-1);
  spec.keep.forEach((col, k) => (keepSlot[col] = k));
  // Up to two kept columns (x and amplitude), written straight into the store's arrays.
  const scale0 = spec.scales?.[0] ?? 1;
  const scale1 = spec.scales?.[1] ?? 1;
  let col0 = store.data[0];
  let col1 = store.data.length > 1 ? store.data[1] : col0;
  let capacity = store.capacity;
  let row = store.rows;
  let i = spec.start;
  let line = spec.firstLine;
  let lineStart = i;
  const decline = (): Resume => ({ pos: lineStart, line });
  if (spec.keep.length > 2) return decline();

  while (i < n) {
    // Content may run to lim - 1; the byte at lim - 1 may also be the line's CR or LF.
    lineStart = i;
    const lim = Math.min(n, lineStart + maxLine + 1);
    let c = b[i];
    while (c === 32 || (c === 9 && dCode !== 9)) c = ++i < lim ? b[i] : END;
    if (c === LF || c === CR) {
      if (c === CR && b[i + 1] === LF) i++;
      i++;
      line++;
      continue;
    }
    if (c === 35) {
      // A comment line: skip to its end within the limit.
      while (c !== LF && c !== END) c = ++i < lim ? b[i] : END;
      if (c === END && i < n) throw lineTooLong(b, lineStart, line, maxLine, 'a row of numbers');
      i++;
      line++;
      continue;
    }
    if (c === END) {
      if (i < n) throw lineTooLong(b, lineStart, line, maxLine, 'a row of numbers');
      break;
    }
    if (row === capacity) {
      store.grow();
      col0 = store.data[0];
      col1 = store.data.length > 1 ? store.data[1] : col0;
      capacity = store.capacity;
    }
    let field = 0;
    for (;;) {
      // One number, perhaps in double quotes as some spreadsheet exports write every field.
      const quoted = c === 34;
      if (quoted) c = ++i < lim ? b[i] : END;
      const fieldStart = i;
      let neg = false;
      if (c === 45 || c === 43) {
        neg = c === 45;
        c = ++i < lim ? b[i] : END;
      }
      // Digits go into an integer mantissa while it stays below 10^15, so it is
      // exact (under 2^53); leading zeros leave it at 0. Any further digit makes
      // the number inexact here, and it is converted from its text instead.
      let mant = 0;
      let scale = 0;
      let exact = true;
      const digitsFrom = i;
      while (c >= 48 && c <= 57) {
        if (mant < 1e14) mant = mant * 10 + (c - 48);
        else {
          exact = false;
          scale++;
        }
        c = ++i < lim ? b[i] : END;
      }
      let digits = i - digitsFrom;
      if (c === decCode || c === 46) {
        c = ++i < lim ? b[i] : END;
        const fractionFrom = i;
        while (c >= 48 && c <= 57) {
          if (mant < 1e14) {
            mant = mant * 10 + (c - 48);
            scale--;
          } else exact = false;
          c = ++i < lim ? b[i] : END;
        }
        digits += i - fractionFrom;
      }
      if (digits === 0) {
        if (c === END && i < n) throw lineTooLong(b, lineStart, line, maxLine, 'a row of numbers');
        return decline();
      }
      if (c === 101 || c === 69) {
        c = ++i < lim ? b[i] : END;
        let eneg = false;
        if (c === 45 || c === 43) {
          eneg = c === 45;
          c = ++i < lim ? b[i] : END;
        }
        let e = 0;
        let ed = 0;
        while (c >= 48 && c <= 57) {
          if (e < 100000) e = e * 10 + (c - 48);
          ed++;
          c = ++i < lim ? b[i] : END;
        }
        if (ed === 0) return decline();
        scale += eneg ? -e : e;
      }
      if (c === END && i < n) throw lineTooLong(b, lineStart, line, maxLine, 'a row of numbers');
      const fieldEnd = i;
      if (quoted) {
        if (c !== 34) return decline();
        c = ++i < lim ? b[i] : END;
      }
      let v: number;
      if (exact && scale >= -22 && scale <= 22) {
        // Clinger's fast path: an exact integer mantissa and an exact power of
        // ten give a correctly rounded result in one operation
        // (W. D. Clinger, "How to read floating point numbers accurately", PLDI 1990).
        v = scale >= 0 ? mant * POW10[scale] : mant / POW10[-scale];
        if (neg) v = -v;
      } else v = slowNumber(b, fieldStart, fieldEnd, decimalComma);
      // Not finite, or an over-range code: the general reader says which, or passes it in a column not read.
      if (!Number.isFinite(v) || isOverRangeCode(v)) return decline();
      const slot = field < columnCount ? keepSlot[field] : -1;
      if (slot === 0) col0[row] = v * scale0;
      else if (slot === 1) col1[row] = v * scale1;
      field++;
      // After a number: blanks, then a delimiter or the end of the line.
      const before = i;
      while (c === 32 || (c === 9 && dCode !== 9)) c = ++i < lim ? b[i] : END;
      if (c === dCode) {
        c = ++i < lim ? b[i] : END;
        while (c === 32 || (c === 9 && dCode !== 9)) c = ++i < lim ? b[i] : END;
        if (c === LF || c === CR || c === END) break; // trailing delimiter
        continue;
      }
      if (ws && i > before && c !== LF && c !== CR && c !== END) continue;
      break;
    }
    if ((c === END && i < n) || i - lineStart > maxLine) {
      throw lineTooLong(b, lineStart, line, maxLine, 'a row of numbers');
    }
    if (c !== LF && c !== CR && c !== END) return decline();
    if (field !== columnCount) throw raggedError(spec, field, line);
    store.endRow(line);
    row++;
    if (c === CR && b[i + 1] === LF) i++;
    i++;
    line++;
  }
  return null;
}

/** One bounded pass over the body: refuse the first line longer than MAX_DATA_LINE_BYTES, reading no further into it. */
function checkLineLengths(b: Uint8Array, from: Resume): void {
  const n = b.length;
  let i = from.pos;
  let line = from.line;
  while (i < n) {
    const lineStart = i;
    const lim = Math.min(n, lineStart + MAX_DATA_LINE_BYTES + 1);
    while (i < lim && b[i] !== LF) i++;
    if (i === lim && lim < n) {
      // Content may fill the limit exactly when a CR LF follows it.
      if (!(b[lim] === LF && b[lim - 1] === CR)) throw lineTooLong(b, lineStart, line, MAX_DATA_LINE_BYTES, 'a row of numbers');
    }
    i++;
    line++;
  }
}

/** Check one row's cells as numbers and keep the columns asked for. */
function storeRow(spec: BodySpec, store: RowStore, slotOf: Int32Array, cells: string[], line: number): void {
  if (cells.length > 1 && cells[cells.length - 1].trim() === '') cells = cells.slice(0, -1);
  if (cells.length === 1 && cells[0].trim() === '') return;
  if (cells.length !== spec.columnCount) throw raggedError(spec, cells.length, line);
  if (store.rows === store.capacity) store.grow();
  for (let k = 0; k < cells.length; k++) {
    const v = numberFromField(cells[k], spec.decimalComma, line, columnLabel(spec.columnNames, k));
    if (slotOf[k] < 0) continue;
    if (isOverRangeCode(v)) {
      const column = columnLabel(spec.columnNames, k);
      throw new TraceInputError(
        'NOT_FINITE',
        `value '${shorten(cells[k].trim())}' in column ${column} is an instrument's over-range or no-reading code (±9.9E37, 9.91E37); expected a measured value`,
        { line, field: column },
      );
    }
    store.data[slotOf[k]][store.rows] = v * (spec.scales?.[slotOf[k]] ?? 1);
  }
  store.endRow(line);
}

/**
 * General reader from `from` on: csv-parse, then each field checked as a
 * number. Lines are length-checked before anything is decoded.
 */
export function readBodyCsvParse(spec: BodySpec, store: RowStore, from: Resume): void {
  checkLineLengths(spec.bytes, from);
  const body = decodeText(spec.bytes, from.pos);
  const slotOf = new Int32Array(spec.columnCount).fill(-1);
  spec.keep.forEach((col, k) => (slotOf[col] = k));
  if (spec.delimiter === 'whitespace') {
    let line = from.line;
    let pos = 0;
    while (pos <= body.length) {
      const nl = body.indexOf('\n', pos);
      const end = nl < 0 ? body.length : nl;
      const t = body.slice(pos, end).trim();
      if (t !== '' && !t.startsWith('#')) storeRow(spec, store, slotOf, t.split(/[ \t]+/), line);
      pos = end + 1;
      line++;
    }
    return;
  }
  try {
    csvParse(body, {
      delimiter: spec.delimiter ?? '\u0000',
      relax_column_count: true,
      skip_empty_lines: true,
      skip_records_with_empty_values: false,
      comment: '#',
      comment_no_infix: true,
      trim: true,
      max_record_size: MAX_DATA_LINE_BYTES,
      // Each record is turned into numbers as it is read and then dropped, so no array of records is built.
      on_record: (record: string[], context: { lines: number }) => {
        storeRow(spec, store, slotOf, record, from.line + context.lines - 1);
        return null;
      },
    });
  } catch (err) {
    if (err instanceof TraceInputError) throw err;
    const e = err as { code?: string; lines?: number };
    // The reader counts lines from the body's first; a quote never closed is noticed at the end, so the
    // line named is the one where it was opened.
    const opened = e.code === 'CSV_QUOTE_NOT_CLOSED' ? unclosedQuoteLine(body, from.line) : null;
    const line = opened ?? (typeof e.lines === 'number' ? from.line + e.lines - 1 : undefined);
    throw new TraceInputError(
      'CSV_SYNTAX',
      `the CSV could not be read: ${csvTrouble(e.code)}`,
      line !== undefined ? { line } : {},
    );
  }
}

/**
 * Read the body: the one pass over the bytes as far as it goes, then the
 * general reader from the first line it declined (or from the start when
 * `general` is asked for).
 */
export function readBody(spec: BodySpec, general: boolean): BodyColumns {
  const store = new RowStore(spec);
  const from = general ? { pos: spec.start, line: spec.firstLine } : readBodyFast(spec, store);
  if (from === null) return store.result('fast');
  readBodyCsvParse(spec, store, from);
  return store.result('csv-parse');
}
