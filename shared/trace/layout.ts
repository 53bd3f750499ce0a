/**
 * Which columns are what: the delimiter and decimal mark, the header (a names
 * row, perhaps with a units row under it), the x column (time, distance or
 * sample index), the amplitude columns (one per channel in an oscilloscope
 * export) and which of them is read.
 */
import { parse as csvParse } from 'csv-parse/browser/esm/sync';
import { shorten, TraceInputError } from './errors';
import type { FileHead } from './head';
import { MAX_COLUMNS } from './lines';
import { type HeadText, readKey, splitMetaText } from './metadata';
import { columnLabel, type Delimiter, numberFromField } from './numeric-rows';
import type { TraceWarning } from '../schemas/trace-analysis';
import type { TraceChannel } from './reader-types';
import { type ColumnInfo, interpretColumn, splitNameAndUnit } from './units';

export interface FileLayout {
  delimiter: Delimiter;
  decimalComma: boolean;
  columnCount: number;
  header: string[] | null;
  headerLine: number | null;
  /** Head rows that are not the header, for the metadata reader. */
  metaRows: HeadText[];
}

const NUMERIC_CELL = /^[+-]?(?:\d+(?:[.,]\d*)?|[.,]\d+)(?:[eE][+-]?\d+)?$/;
const NON_FINITE_CELL = /^[+-]?(nan|inf|infinity)$/i;

function unquote(s: string): string {
  const t = s.trim();
  if (t.length >= 2 && (t[0] === '"' || t[0] === "'") && t[t.length - 1] === t[0]) return t.slice(1, -1).trim();
  return t;
}

function isNumericCell(s: string): boolean {
  const t = unquote(s);
  return NUMERIC_CELL.test(t) || NON_FINITE_CELL.test(t);
}

export function splitRow(row: string, delimiter: Delimiter): string[] {
  if (delimiter === null) return [unquote(row)];
  if (delimiter === 'whitespace') {
    // "time (ns) voltage (mV)": a bracketed unit belongs to the name before it.
    const cells: string[] = [];
    for (const w of row.trim().split(/[ \t]+/)) {
      if (cells.length > 0 && /^[([{][^)\]}]*[)\]}]$/.test(w)) cells[cells.length - 1] += ` ${w}`;
      else cells.push(w);
    }
    return cells;
  }
  let cells: string[];
  if (row.includes('"')) {
    try {
      const rec = csvParse(row, { delimiter, relax_quotes: true, relax_column_count: true, trim: true }) as string[][];
      cells = rec[0] ?? [];
    } catch {
      cells = row.split(delimiter);
    }
  } else cells = row.split(delimiter);
  cells = cells.map(unquote);
  while (cells.length > 1 && cells[cells.length - 1] === '') cells.pop();
  return cells;
}

function detectDelimiter(samples: string[]): Delimiter {
  if (samples.some((s) => s.includes('\t'))) return '\t';
  if (samples.some((s) => s.includes(';'))) return ';';
  if (samples.some((s) => s.includes(','))) return ',';
  if (samples.some((s) => /\S[ ]+\S/.test(s))) return 'whitespace';
  return null;
}

/** Delimiter and decimal mark from the first rows of numbers. */
function readDelimiter(head: FileHead): { delimiter: Delimiter; decimalComma: boolean } {
  const samples = head.samples.map((s) => s.text);
  let delimiter = detectDelimiter(samples);
  let decimalComma =
    (delimiter === ';' || delimiter === '\t' || delimiter === 'whitespace') && samples.some((s) => s.includes(','));
  const rows = head.rows.filter((r) => !r.comment);
  const lastRow = rows.length > 0 ? rows[rows.length - 1] : undefined;
  if (
    delimiter === ',' &&
    lastRow &&
    !lastRow.text.includes(',') &&
    !/[:=]/.test(lastRow.text) &&
    samples.every((s) => s.split(',').length === 2 && !s.includes('.'))
  ) {
    // One column written with decimal commas: "0,125" under a single-name header.
    delimiter = null;
    decimalComma = true;
  }
  return { delimiter, decimalComma };
}

/** A row of one cell that is a setting ("key: value", "NVP 67%") rather than a column title. */
function isSetting(cells: string[], columnCount: number): boolean {
  if (columnCount !== 1 || cells.length !== 1) return false;
  const kv = splitMetaText(cells[0]);
  return kv !== null && (/[:=]/.test(cells[0]) || readKey(kv.key).meaning !== null);
}

/** The units row under a names row: every cell a unit the reader knows ("s", "(V)", "mV"). */
function unitsRow(cells: string[]): string[] | null {
  const units = cells.map((u) => u.replace(/^[([{]\s*|\s*[)\]}]$/g, ''));
  const known = units.every((u) => {
    const info = interpretColumn(`x (${u})`);
    return u !== '' && !info.unknownUnit && info.unit !== null;
  });
  return known ? units : null;
}

/**
 * A header just above the numbers whose count of names is not the first row's count of values. The number of
 * columns is read from the first row of numbers, so without this the header would not be taken as one and the
 * file refused for something else. Where the rows after the first have as many values as the header, the first
 * row is the wrong one and is named; where every row of numbers has the same other count, the header is.
 */
function refuseHeaderMisfit(
  head: FileHead,
  rows: FileHead['rows'],
  rowCells: string[][],
  columnCount: number,
  delimiter: Delimiter,
  allNames: (cells: string[]) => boolean,
): void {
  const last = rows.length - 1;
  if (last < 0 || rows[last].line !== head.dataLine - 1) return;
  const names = rowCells[last];
  if (names.length === columnCount || names.length < 2 || !allNames(names)) return;
  const widths = head.samples.map((s) => splitRow(s.text, delimiter).length);
  if (widths.length >= 2 && widths[1] === names.length) {
    throw new TraceInputError(
      'RAGGED_ROW',
      `row has ${columnCount} value${columnCount === 1 ? '' : 's'}; expected ${names.length} like the header on line ${rows[last].line}`,
      { line: head.samples[0].line },
    );
  }
  if (delimiter === null || delimiter === 'whitespace' || !widths.every((w) => w === columnCount)) return;
  const shown = names.map((n) => `'${shorten(n, 20)}'`).join(', ');
  throw new TraceInputError(
    'HEADER_MISMATCH',
    `the header names ${names.length} columns (${shorten(shown, 120)}) but the rows of numbers below it have ${columnCount}; give one name per column`,
    { line: rows[last].line },
  );
}

/** Split the head into header and metadata rows, and work out the delimiter and the number of columns. */
export function readLayout(head: FileHead): FileLayout {
  const { delimiter, decimalComma } = readDelimiter(head);
  const rows = head.rows.filter((r) => !r.comment);
  const headDelimiter: Delimiter =
    delimiter ?? ([';', '\t', ','] as const).find((d) => rows.some((r) => r.text.includes(d))) ?? null;
  const columnCount = splitRow(head.samples[0].text, delimiter).length;
  if (columnCount > MAX_COLUMNS) {
    throw new TraceInputError('TOO_MANY_COLUMNS', `the row has ${columnCount} columns; at most ${MAX_COLUMNS} are read`, {
      line: head.samples[0].line,
    });
  }
  const rowCells = rows.map((r) => splitRow(r.text, delimiter ?? headDelimiter));
  const allNames = (cells: string[]) => cells.every((c) => c !== '' && !isNumericCell(c));
  refuseHeaderMisfit(head, rows, rowCells, columnCount, delimiter, allNames);
  // Rows of broken numbers (NaN, text) just above the first clean row belong to the data, not the header.
  let headRows = rows.length;
  while (headRows > 0 && rowCells[headRows - 1].length === columnCount && isNumericCell(rowCells[headRows - 1][0] ?? ''))
    headRows--;
  let header: string[] | null = null;
  let headerLine: number | null = null;
  const headerIdx = new Set<number>();
  if (headRows > 0) {
    const cells = delimiter === null ? [unquote(rows[headRows - 1].text)] : rowCells[headRows - 1];
    if (cells.length === columnCount && allNames(cells) && !isSetting(cells, columnCount)) {
      header = cells;
      headerLine = rows[headRows - 1].line;
      headerIdx.add(headRows - 1);
      const units = headRows >= 2 ? unitsRow(cells) : null;
      const names = headRows >= 2 ? rowCells[headRows - 2] : null;
      // A units row under a names row ("Time,Voltage" then "s,V").
      if (units && names && names.length === columnCount && allNames(names)) {
        header = names.map((name, k) => `${name} (${units[k]})`);
        headerLine = rows[headRows - 2].line;
        headerIdx.add(headRows - 2);
      }
    }
  }
  const splitByDelimiter = (delimiter ?? headDelimiter) !== null && delimiter !== 'whitespace';
  const metaRows: HeadText[] = [];
  let k = 0;
  for (const r of head.rows) {
    if (r.comment) {
      metaRows.push({ text: r.text, line: r.line, cells: null });
      continue;
    }
    const idx = k++;
    if (headerIdx.has(idx)) continue;
    const cells = rowCells[idx];
    if (idx >= headRows) {
      // A broken row of data (NaN, text) before the first clean one: say what is wrong with it.
      cells.forEach((c, col) => numberFromField(c, decimalComma, r.line, columnLabel(header ?? [], col)));
    }
    metaRows.push({ text: r.text, line: r.line, cells: splitByDelimiter ? cells : null });
  }
  return { delimiter, decimalComma, columnCount, header, headerLine, metaRows };
}

export interface ColumnPlan {
  infos: ColumnInfo[] | null;
  /** Position of the x column, or -1 for amplitude alone. */
  xCol: number;
  /** Position of the amplitude column read. */
  ampCol: number;
  channel: TraceChannel;
  warnings: TraceWarning[];
}

function normalName(s: string): string {
  return s.toLowerCase().replace(/[\s_-]+/g, '');
}

/** Pick a channel by name (with or without its unit, any case) or by 1-based number. */
function chooseChannel(names: string[], wanted: string | number | undefined, headerLine: number | null): number {
  if (wanted === undefined) return 0;
  if (typeof wanted === 'number' || /^\s*\d+\s*$/.test(wanted)) {
    const byName = typeof wanted === 'string' ? names.findIndex((n) => normalName(n) === normalName(wanted)) : -1;
    if (byName >= 0) return byName;
    const k = Number(wanted);
    if (Number.isInteger(k) && k >= 1 && k <= names.length) return k - 1;
  } else {
    const w = normalName(wanted);
    const wBase = normalName(splitNameAndUnit(wanted).base);
    let k = names.findIndex((n) => normalName(n) === w);
    if (k < 0) k = names.findIndex((n) => normalName(splitNameAndUnit(n).base) === wBase);
    if (k >= 0) return k;
  }
  const list = names.map((n, k) => `${k + 1} '${shorten(n, 24)}'`).join(', ');
  throw new TraceInputError(
    'UNKNOWN_CHANNEL',
    `channel '${shorten(String(wanted))}' is not in the file; its channels are ${list}`,
    headerLine !== null ? { line: headerLine, field: 'channel' } : { field: 'channel' },
  );
}

function refuseUnknownUnits(infos: ColumnInfo[], headerLine: number | null): void {
  for (const info of infos) {
    if (!info.unknownUnit) continue;
    const { unit } = splitNameAndUnit(info.name);
    throw new TraceInputError(
      'UNKNOWN_UNIT',
      `column '${shorten(info.name)}' has unit '${shorten(unit ?? '', 16)}'; expected a time (s, ms, us, ns, ps), a distance (m, ft) or an amplitude (V, mV, rho)`,
      { line: headerLine ?? undefined, field: info.name },
    );
  }
}

/** The x column and the amplitude columns from the header's names (or by position without one). */
function findColumns(layout: FileLayout, infos: ColumnInfo[] | null): { xCol: number; amps: number[] } {
  const { columnCount, header, headerLine } = layout;
  const all = Array.from({ length: columnCount }, (_, k) => k);
  if (columnCount === 1) return { xCol: -1, amps: [0] };
  if (!infos) return { xCol: 0, amps: all.slice(1) };
  let xCol = infos.findIndex((c) => c.role === 'time' || c.role === 'distance');
  if (xCol < 0) xCol = infos.findIndex((c) => c.role === 'index');
  if (xCol < 0 && infos[0].role === 'unknown') xCol = 0;
  let amps = all.filter((k) => k !== xCol && infos[k].role === 'amplitude');
  if (amps.length === 0) amps = all.filter((k) => k !== xCol && infos[k].role === 'unknown');
  if (amps.length === 0) {
    const names = header!.map((h) => `'${shorten(h, 24)}'`).join(', ');
    throw new TraceInputError('NO_AMPLITUDE_COLUMN', `no amplitude column among ${names}`, { line: headerLine ?? undefined });
  }
  return { xCol, amps };
}

/** Decide which column is x and which amplitude column is read. */
export function planColumns(layout: FileLayout, wantedChannel: string | number | undefined): ColumnPlan {
  const { header, headerLine, columnCount } = layout;
  const infos = header ? header.map(interpretColumn) : null;
  if (infos) refuseUnknownUnits(infos, headerLine);
  const { xCol, amps } = findColumns(layout, infos);
  const names = amps.map((k) => header?.[k] ?? (columnCount === 1 ? 'amplitude' : `column ${k + 1}`));
  const chosen = chooseChannel(names, wantedChannel, headerLine);
  const ampCol = amps[chosen];
  const warnings: TraceWarning[] = [];
  const ignored = columnCount - 1 - (xCol >= 0 ? 1 : 0);
  if (ignored > 0) {
    const others = amps.length > 1 ? '; choose another channel by its name or number' : '';
    warnings.push({
      code: 'EXTRA_COLUMNS',
      message: `only column ${header ? `'${shorten(header[ampCol])}'` : ampCol + 1} was analysed; ${ignored} other column(s) ignored${others}`,
    });
  }
  return { infos, xCol, ampCol, channel: { name: names[chosen], index: chosen + 1, available: names }, warnings };
}

/** Unit and scale of the amplitude: from its column title, else the metadata, else volts. */
export function amplitudeUnitOf(
  info: ColumnInfo | undefined,
  fromMetadata: { unit: 'V' | 'rho'; scale: number } | undefined,
): { unit: 'V' | 'rho'; scale: number } {
  if (info?.amplitudeUnit && info.unit !== null) return { unit: info.amplitudeUnit, scale: info.scale };
  if (fromMetadata) return fromMetadata;
  if (info?.amplitudeUnit) return { unit: info.amplitudeUnit, scale: info.scale };
  return { unit: 'V', scale: 1 };
}
