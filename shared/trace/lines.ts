/**
 * The file as bytes, and its lines read with a bound: the reader never looks
 * further than a limit past the start of a line, so one enormous line is
 * refused after a few kilobytes, not after the whole of it has been scanned
 * or copied into a string.
 */
import { TraceInputError } from './errors';

/** Default upper bound on a whole file, in bytes. */
export const DEFAULT_MAX_BYTES = 64 * 1024 * 1024;
/** Longest row of numbers, in bytes: 64 columns of 60-character numbers fit. */
export const MAX_DATA_LINE_BYTES = 4 * 1024;
/** Longest line before the numbers (metadata, header), in bytes. */
export const MAX_HEADER_LINE_BYTES = 64 * 1024;
/** Most columns a trace file may have. */
export const MAX_COLUMNS = 64;
/** Most lines of metadata and header before the first row of numbers. */
export const MAX_HEAD_LINES = 5000;

const LF = 10;
const CR = 13;

const utf8 = new TextDecoder('utf-8', { fatal: true });
const utf8Lenient = new TextDecoder('utf-8');
let westernEuropean: TextDecoder | null | undefined;

/**
 * Text of a byte range: UTF-8, or Windows-1252 when the bytes are not valid
 * UTF-8 (older instruments write `µs` as one byte).
 */
export function decodeText(bytes: Uint8Array, start = 0, end = bytes.length): string {
  const view = bytes.subarray(start, end);
  try {
    return utf8.decode(view);
  } catch {
    if (westernEuropean === undefined) {
      try {
        westernEuropean = new TextDecoder('windows-1252');
      } catch {
        westernEuropean = null;
      }
    }
    return (westernEuropean ?? utf8Lenient).decode(view);
  }
}

export interface TraceBytes {
  bytes: Uint8Array;
  /** Offset of the first byte after any byte-order mark. */
  start: number;
}

function tooLarge(maxBytes: number): TraceInputError {
  const mib = (maxBytes / 1048576).toFixed(maxBytes >= 1048576 ? 0 : 2);
  return new TraceInputError('FILE_TOO_LARGE', `the file is larger than the ${mib} MiB limit`);
}

function isBlank(c: number): boolean {
  return c === 32 || c === 9 || c === LF || c === CR || c === 11 || c === 12;
}

/**
 * The byte order of UTF-16 text saved without its byte-order mark, or null: over the first 512 byte
 * pairs, the NUL sits on the same side of every pair and the other side is printable ASCII or a line
 * break, as CSV text in UTF-16 is. Anything less regular is not taken for text.
 */
function bareUtf16(bytes: Uint8Array): 'utf-16le' | 'utf-16be' | null {
  const n = Math.min(bytes.length, 1024) & ~1;
  if (n < 8) return null;
  const ascii = (c: number) => c === 9 || c === 10 || c === 13 || (c >= 32 && c < 127);
  let le = true;
  let be = true;
  for (let i = 0; i < n; i += 2) {
    le &&= bytes[i + 1] === 0 && ascii(bytes[i]);
    be &&= bytes[i] === 0 && ascii(bytes[i + 1]);
  }
  return le ? 'utf-16le' : be ? 'utf-16be' : null;
}

/** The trace file as UTF-8 bytes, checked for size, emptiness and binary content. */
export function traceBytes(input: string | Uint8Array, maxBytes: number): TraceBytes {
  let bytes: Uint8Array;
  if (typeof input === 'string') {
    // Every character is at least one byte, so a string this long is too large whatever it holds.
    if (input.length > maxBytes) throw tooLarge(maxBytes);
    bytes = new TextEncoder().encode(input);
  } else if (input instanceof Uint8Array) {
    bytes = input;
  } else {
    throw new TraceInputError('NOT_TEXT', 'the trace must be given as text or as the bytes of a text file');
  }
  if (bytes.length > maxBytes) throw tooLarge(maxBytes);
  // UTF-16 with a byte-order mark, as some desktop tools save "Unicode text".
  if (bytes.length >= 2 && ((bytes[0] === 0xff && bytes[1] === 0xfe) || (bytes[0] === 0xfe && bytes[1] === 0xff))) {
    const text = new TextDecoder(bytes[0] === 0xff ? 'utf-16le' : 'utf-16be').decode(bytes.subarray(2));
    bytes = new TextEncoder().encode(text);
    if (bytes.length > maxBytes) throw tooLarge(maxBytes);
  }
  const start = bytes.length >= 3 && bytes[0] === 0xef && bytes[1] === 0xbb && bytes[2] === 0xbf ? 3 : 0;
  let first = start;
  while (first < bytes.length && isBlank(bytes[first])) first++;
  if (first >= bytes.length) throw new TraceInputError('EMPTY_FILE', 'the file is empty; expected a header and rows of numbers');
  if (bytes.subarray(start, start + 65536).indexOf(0) >= 0) {
    // UTF-16 saved without its byte-order mark: text of this kind is ASCII, so every other byte is NUL.
    const order = bareUtf16(bytes);
    if (order) {
      bytes = new TextEncoder().encode(new TextDecoder(order).decode(bytes));
      if (bytes.length > maxBytes) throw tooLarge(maxBytes);
      return traceBytes(bytes, maxBytes);
    }
    throw new TraceInputError('NOT_TEXT', 'the file is not text (it contains NUL bytes); expected a CSV export');
  }
  if (bytes.indexOf(LF, start) < 0 && bytes.indexOf(CR, start) >= 0) {
    // Lines ended by CR alone: read them as LF.
    bytes = bytes.map((c) => (c === CR ? LF : c));
  }
  return { bytes, start };
}

/**
 * End of the line that starts at `pos` (the offset of its LF, or the end of
 * the file), looking at no more than `limit` bytes of content; -1 when the
 * line is longer than that.
 */
export function lineEnd(bytes: Uint8Array, pos: number, limit: number): number {
  const n = bytes.length;
  // Room for the content, a CR and the LF.
  const stop = Math.min(n, pos + limit + 2);
  const k = bytes.subarray(pos, stop).indexOf(LF);
  const end = k >= 0 ? pos + k : stop;
  if (k < 0 && stop < n) return -1;
  const contentEnd = end > pos && bytes[end - 1] === CR ? end - 1 : end;
  return contentEnd - pos > limit ? -1 : end;
}

/** A line refused for its length; says which limit and what the line looked like. */
export function lineTooLong(bytes: Uint8Array, pos: number, line: number, limit: number, what: string): TraceInputError {
  // The first few bytes only; a character cut in two at the end is dropped.
  const start = utf8Lenient.decode(bytes.subarray(pos, Math.min(bytes.length, pos + 24))).replace(/\uFFFD+$/, '');
  return new TraceInputError(
    'LINE_TOO_LONG',
    `the line is longer than ${limit} bytes, the limit for ${what}; it begins '${start}…'`,
    { line },
  );
}

/**
 * How many lines the bytes from `start` hold, estimated from the length of a
 * few lines at the start, a quarter, half and three quarters of the way and
 * near the end, so the arrays for the numbers can be sized once. Reads a few
 * hundred bytes at each place, never the whole file.
 */
export function estimateLines(bytes: Uint8Array, start: number): number {
  const n = bytes.length;
  const span = n - start;
  let lines = 0;
  let length = 0;
  for (const at of [0, 0.25, 0.5, 0.75, 0.97]) {
    let pos = start + Math.floor(span * at);
    if (at > 0) {
      // Move to the start of the next line.
      const end = lineEnd(bytes, pos, 4096);
      if (end < 0 || end >= n) continue;
      pos = end + 1;
    }
    for (let k = 0; k < 16 && pos < n; k++) {
      const end = lineEnd(bytes, pos, 4096);
      if (end < 0) break;
      length += end + 1 - pos;
      lines++;
      pos = end + 1;
    }
  }
  return lines === 0 ? 16 : Math.ceil((span / (length / lines)) * 1.03) + 16;
}
