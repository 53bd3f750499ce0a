/**
 * Reading the numeric body of a trace file: plain rows of numbers after the
 * header. Two readers give the same result:
 *  - csv-parse (browser build, which carries its own Buffer shim, so it runs
 *    on the server and in the browser) reads every file that is not plain:
 *    quoted fields, stray characters, and anything the fast reader declines;
 *  - a single-pass reader over char codes, used only for plain rows (digits,
 *    signs, exponent, one decimal mark, delimiter). On a 1 000 000-row file it
 *    is about 10× faster and keeps no per-row strings; csv-parse's sync API
 *    needed about 1.8 s and 280 MB heap there (measured on the 2-core CI box).
 * Both report a bad row with the same code and line number.
 */
import { parse as csvParse } from 'csv-parse/browser/esm/sync';
import { TraceInputError } from './errors';

export type Delimiter = ',' | ';' | '\t' | 'whitespace' | null;

export interface BodySpec {
  text: string;
  /** Offset in `text` where the body starts (start of a line). */
  start: number;
  /** 1-based file line number of the line at `start`. */
  firstLine: number;
  delimiter: Delimiter;
  decimalComma: boolean;
  columnCount: number;
  /** Columns to keep, by position. */
  keep: number[];
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
const NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

function columnLabel(spec: BodySpec, col: number): string {
  const name = spec.columnNames[col];
  return name ? `'${name}'` : `${col + 1}`;
}

/** Convert one field to a number or throw the error a person can act on. */
export function numberFromField(raw: string, decimalComma: boolean, line: number, column: string): number {
  let s = raw.trim();
  if (s.length >= 2 && (s[0] === '"' || s[0] === "'") && s[s.length - 1] === s[0]) s = s.slice(1, -1).trim();
  if (s === '') throw new TraceInputError('EMPTY_VALUE', `column ${column} is empty; expected a number`, { line, field: column });
  if (decimalComma) s = s.replace(',', '.');
  if (NUMBER.test(s)) {
    const v = Number(s);
    if (Number.isFinite(v)) return v;
    throw new TraceInputError(
      'NOT_FINITE',
      `value '${raw.trim()}' in column ${column} is out of range; expected a finite number`,
      { line, field: column },
    );
  }
  if (NON_FINITE.test(s)) {
    throw new TraceInputError(
      'NOT_FINITE',
      `value '${raw.trim()}' in column ${column} is not a finite number; expected a measured value`,
      { line, field: column },
    );
  }
  const shown = raw.trim().length > 40 ? `${raw.trim().slice(0, 40)}…` : raw.trim();
  throw new TraceInputError('NOT_A_NUMBER', `'${shown}' in column ${column} is not a number`, { line, field: column });
}

function raggedError(spec: BodySpec, got: number, line: number): TraceInputError {
  return new TraceInputError(
    'RAGGED_ROW',
    `row has ${got} value${got === 1 ? '' : 's'}; expected ${spec.columnCount} like the rows above`,
    { line },
  );
}

class Growable {
  data: Float64Array;
  length = 0;
  constructor(n: number) {
    this.data = new Float64Array(Math.max(16, n));
  }
  push(v: number) {
    if (this.length === this.data.length) {
      const next = new Float64Array(this.data.length * 2);
      next.set(this.data);
      this.data = next;
    }
    this.data[this.length++] = v;
  }
  result(): Float64Array {
    return this.length === this.data.length ? this.data : this.data.subarray(0, this.length);
  }
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
 * Fast reader. Returns null (so the caller falls back to csv-parse) when it
 * meets anything but plain numeric rows, so it never has to be right about
 * quoting rules.
 */
export function readBodyFast(spec: BodySpec): BodyColumns | null {
  const { text, delimiter, decimalComma, columnCount } = spec;
  const n = text.length;
  const dCode = delimiter === ',' ? 44 : delimiter === ';' ? 59 : delimiter === '\t' ? 9 : -1;
  const ws = delimiter === 'whitespace';
  // With decimal commas a point is accepted too, as csv-parse's path does.
  const decCode = decimalComma ? 44 : 46;
  const keepSlot = new Int32Array(columnCount).fill(-1);
  spec.keep.forEach((c, k) => (keepSlot[c] = k));
  const cols = spec.keep.map(() => new Growable(spec.rowEstimate));
  const lines = new LineMap(spec.firstLine);
  let i = spec.start;
  let line = spec.firstLine;
  let rows = 0;
  let firstRowLine = -1;
  let lastRowLine = -1;

  while (i < n) {
    // Start of a line: skip leading blanks, blank lines, comment lines.
    let c = text.charCodeAt(i);
    while (i < n && (c === 32 || (c === 9 && dCode !== 9))) c = text.charCodeAt(++i);
    if (i >= n) break;
    if (c === 10 || c === 13) {
      if (c === 13 && text.charCodeAt(i + 1) === 10) i++;
      i++;
      line++;
      continue;
    }
    if (c === 35) {
      const nl = text.indexOf('\n', i);
      if (nl < 0) break;
      i = nl + 1;
      line++;
      continue;
    }
    let field = 0;
    for (;;) {
      // One number.
      const fieldStart = i;
      let neg = false;
      c = text.charCodeAt(i);
      if (c === 45 || c === 43) {
        neg = c === 45;
        c = text.charCodeAt(++i);
      }
      let mant = 0;
      let digits = 0;
      let sig = 0;
      let scale = 0;
      let exact = true;
      while (c >= 48 && c <= 57) {
        if (sig > 0 || c !== 48) {
          if (sig < 15) mant = mant * 10 + (c - 48);
          else {
            exact = false;
            scale++;
          }
          sig++;
        }
        digits++;
        c = text.charCodeAt(++i);
      }
      if (c === decCode || c === 46) {
        c = text.charCodeAt(++i);
        while (c >= 48 && c <= 57) {
          if (sig > 0 || c !== 48) {
            if (sig < 15) {
              mant = mant * 10 + (c - 48);
              scale--;
            } else exact = false;
            sig++;
          } else scale--;
          digits++;
          c = text.charCodeAt(++i);
        }
      }
      if (digits === 0) return null;
      if (c === 101 || c === 69) {
        c = text.charCodeAt(++i);
        let eneg = false;
        if (c === 45 || c === 43) {
          eneg = c === 45;
          c = text.charCodeAt(++i);
        }
        let e = 0;
        let ed = 0;
        while (c >= 48 && c <= 57) {
          if (e < 100000) e = e * 10 + (c - 48);
          ed++;
          c = text.charCodeAt(++i);
        }
        if (ed === 0) return null;
        scale += eneg ? -e : e;
      }
      let v: number;
      if (exact && scale >= -22 && scale <= 22) {
        // Clinger's fast path: an exact integer mantissa and an exact power of
        // ten give a correctly rounded result in one operation
        // (W. D. Clinger, "How to read floating point numbers accurately", PLDI 1990).
        v = scale >= 0 ? mant * POW10[scale] : mant / POW10[-scale];
        if (neg) v = -v;
      } else {
        let s = text.slice(fieldStart, i);
        if (decCode === 44) s = s.replace(',', '.');
        v = Number(s);
      }
      if (!Number.isFinite(v)) return null;
      const slot = field < columnCount ? keepSlot[field] : -1;
      if (slot >= 0) cols[slot].push(v);
      field++;
      // After a number: spaces, then a delimiter or the end of the line.
      while (c === 32 || (c === 9 && dCode !== 9)) c = text.charCodeAt(++i);
      if (c === dCode) {
        c = text.charCodeAt(++i);
        while (c === 32 || (c === 9 && dCode !== 9)) c = text.charCodeAt(++i);
        if (c === 10 || c === 13 || i >= n) break; // trailing delimiter
        if (ws) continue;
        continue;
      }
      if (
        ws &&
        i > fieldStart &&
        (text.charCodeAt(i - 1) === 32 || text.charCodeAt(i - 1) === 9) &&
        !(c === 10 || c === 13 || i >= n)
      ) {
        continue;
      }
      if (c === 10 || c === 13 || i >= n) break;
      return null;
    }
    if (field !== columnCount) {
      if (field < columnCount) {
        // Undo the partial row before reporting, so the state stays consistent for the caller.
        throw raggedError(spec, field, line);
      }
      throw raggedError(spec, field, line);
    }
    lines.note(rows, line, spec.firstLine + rows);
    if (firstRowLine < 0) firstRowLine = line;
    lastRowLine = line;
    rows++;
    if (c === 13 && text.charCodeAt(i + 1) === 10) i++;
    i++;
    line++;
  }
  return {
    columns: cols.map((g) => g.result()),
    rows,
    firstRowLine,
    lastRowLine,
    lineOfRow: (r) => lines.lineOf(r),
    reader: 'fast',
  };
}

interface CsvRecord {
  record: string[];
  info: { lines: number };
}

/** General reader: csv-parse, then each field checked as a number. */
export function readBodyCsvParse(spec: BodySpec): BodyColumns {
  const body = spec.text.slice(spec.start);
  const cols = spec.keep.map(() => new Growable(Math.min(spec.rowEstimate, 1 << 20)));
  const lines = new LineMap(spec.firstLine);
  let rows = 0;
  let firstRowLine = -1;
  let lastRowLine = -1;
  const onRow = (cells: string[], line: number) => {
    if (cells.length > 1 && cells[cells.length - 1].trim() === '') cells = cells.slice(0, -1);
    if (cells.length === 1 && cells[0].trim() === '') return;
    if (cells.length !== spec.columnCount) throw raggedError(spec, cells.length, line);
    for (let k = 0; k < cells.length; k++) {
      const v = numberFromField(cells[k], spec.decimalComma, line, columnLabel(spec, k));
      const slot = spec.keep.indexOf(k);
      if (slot >= 0) cols[slot].push(v);
    }
    lines.note(rows, line, spec.firstLine + rows);
    if (firstRowLine < 0) firstRowLine = line;
    lastRowLine = line;
    rows++;
  };
  if (spec.delimiter === 'whitespace') {
    let line = spec.firstLine;
    for (const raw of body.split(/\r\n|\n|\r/)) {
      const t = raw.trim();
      if (t !== '' && !t.startsWith('#')) onRow(t.split(/[ \t]+/), line);
      line++;
    }
  } else {
    let records: CsvRecord[];
    try {
      records = csvParse(body, {
        delimiter: spec.delimiter ?? '\u0000',
        relax_column_count: true,
        skip_empty_lines: true,
        skip_records_with_empty_values: false,
        comment: '#',
        comment_no_infix: true,
        trim: true,
        info: true,
      }) as unknown as CsvRecord[];
    } catch (err) {
      const e = err as { message?: string; lines?: number };
      const line = typeof e.lines === 'number' ? spec.firstLine + e.lines - 1 : undefined;
      const msg = (e.message ?? 'unreadable CSV').replace(/^Invalid [^:]*:\s*/, '');
      throw new TraceInputError('CSV_SYNTAX', `the CSV could not be read (${msg})`, line !== undefined ? { line } : {});
    }
    for (const r of records) onRow(r.record, spec.firstLine + r.info.lines - 1);
  }
  return {
    columns: cols.map((g) => g.result()),
    rows,
    firstRowLine,
    lastRowLine,
    lineOfRow: (r) => lines.lineOf(r),
    reader: 'csv-parse',
  };
}
