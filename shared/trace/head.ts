/**
 * The head of a trace file: every line before the first row of numbers
 * (metadata, comments, the header), and the first rows of numbers themselves,
 * from which the layout is worked out. Each line is read with a bound.
 */
import { TraceInputError } from './errors';
import {
  decodeText,
  lineEnd,
  lineTooLong,
  MAX_DATA_LINE_BYTES,
  MAX_HEAD_LINES,
  MAX_HEADER_LINE_BYTES,
  type TraceBytes,
} from './lines';

export interface HeadRow {
  /** The line's text, trimmed; for a comment, the text after the comment mark. */
  text: string;
  line: number;
  comment: boolean;
}

export interface SampleRow {
  text: string;
  line: number;
}

export interface FileHead {
  rows: HeadRow[];
  /** Byte offset and line number of the first row of numbers. */
  dataStart: number;
  dataLine: number;
  /** Up to SAMPLE_ROWS rows of numbers from the first one (comments and blank lines skipped). */
  samples: SampleRow[];
}

const SAMPLE_ROWS = 50;
/** A line made only of what rows of numbers are made of. */
const DATA_SHAPED = /^[-+.\d"'][-+.,;\d\teE"' ]*$/;

export function commentBody(t: string): string | null {
  if (t.startsWith('//')) return t.slice(2).trim();
  if (t[0] === '#' || t[0] === '%' || t[0] === '!' || t[0] === '*') return t.replace(/^[#%!*]+/, '').trim();
  return null;
}

function noNumbers(extra = ''): TraceInputError {
  return new TraceInputError('NO_NUMERIC_ROWS', `no rows of numbers were found${extra}; expected numeric rows after the header`);
}

/** A line that begins like a row of numbers but has words in it, such as `12.5 ns, 0.031 V`. */
const NUMBER_FIRST = /^[-+]?(\d|\.\d)/;

/**
 * Why no row of numbers was found: where a line starts with a number but carries words beside it (units written
 * in every cell, say), name the first such line, since that is most likely meant to be the data.
 */
function noNumbersIn(rows: HeadRow[], where = ''): TraceInputError {
  const wordy = rows.find((r) => !r.comment && NUMBER_FIRST.test(r.text));
  if (!wordy) return noNumbers(where);
  const shown = wordy.text.length > 40 ? `${wordy.text.slice(0, 40)}…` : wordy.text;
  return new TraceInputError(
    'NO_NUMERIC_ROWS',
    `"${shown}" starts with a number but has words beside its numbers: give every cell as a plain number and put the units in the header (no rows of numbers were found${where})`,
    { line: wordy.line },
  );
}

/** Refuse a line longer than the head limit, naming the limit that applies to what it looks like. */
function refuseLongHeadLine(src: TraceBytes, pos: number, line: number): never {
  const prefix = decodeText(src.bytes, pos, Math.min(src.bytes.length, pos + 64)).trim();
  if (DATA_SHAPED.test(prefix)) throw lineTooLong(src.bytes, pos, line, MAX_DATA_LINE_BYTES, 'a row of numbers');
  throw lineTooLong(src.bytes, pos, line, MAX_HEADER_LINE_BYTES, 'a line before the numbers');
}

function readSamples(src: TraceBytes, dataStart: number, dataLine: number): SampleRow[] {
  const { bytes } = src;
  const samples: SampleRow[] = [];
  let pos = dataStart;
  let line = dataLine;
  while (pos < bytes.length && samples.length < SAMPLE_ROWS) {
    const end = lineEnd(bytes, pos, MAX_DATA_LINE_BYTES);
    if (end < 0) throw lineTooLong(bytes, pos, line, MAX_DATA_LINE_BYTES, 'a row of numbers');
    const t = decodeText(bytes, pos, end).trim();
    if (t !== '' && !t.startsWith('#')) samples.push({ text: t, line });
    pos = end + 1;
    line++;
  }
  return samples;
}

/** Split off the head and find the first rows of numbers. */
export function readHead(src: TraceBytes): FileHead {
  const { bytes } = src;
  const rows: HeadRow[] = [];
  let pos = src.start;
  let line = 1;
  while (pos < bytes.length) {
    const end = lineEnd(bytes, pos, MAX_HEADER_LINE_BYTES);
    if (end < 0) refuseLongHeadLine(src, pos, line);
    const t = decodeText(bytes, pos, end).trim();
    if (t !== '') {
      const comment = commentBody(t);
      if (comment !== null) rows.push({ text: comment, line, comment: true });
      else if (DATA_SHAPED.test(t) && /\d/.test(t)) {
        if (lineEnd(bytes, pos, MAX_DATA_LINE_BYTES) < 0) {
          throw lineTooLong(bytes, pos, line, MAX_DATA_LINE_BYTES, 'a row of numbers');
        }
        return { rows, dataStart: pos, dataLine: line, samples: readSamples(src, pos, line) };
      } else rows.push({ text: t, line, comment: false });
    }
    if (line >= MAX_HEAD_LINES) throw noNumbersIn(rows, ` in the first ${MAX_HEAD_LINES} lines`);
    pos = end + 1;
    line++;
  }
  throw noNumbersIn(rows);
}
