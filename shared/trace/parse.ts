/**
 * Reading a TDR trace from CSV in the layouts instruments and oscilloscopes
 * write: time + amplitude, distance + amplitude, or amplitude alone with the
 * sample interval in the metadata; comma, semicolon, tab or blank-separated;
 * decimal commas with semicolon or tab delimiters; metadata before the header
 * as `# key: value` comments or `key,value` rows.
 */
import { parse as csvParse } from 'csv-parse/browser/esm/sync';
import { SPEED_OF_LIGHT_M_PER_S } from '../cable/propagation';
import { TraceInputError } from './errors';
import { type BodyColumns, type BodySpec, type Delimiter, readBodyCsvParse, readBodyFast } from './numeric-rows';
import {
  type ColumnInfo,
  distanceUnitScale,
  interpretColumn,
  normaliseKey,
  splitNameAndUnit,
  splitQuantity,
  timeUnitScale,
} from './units';
import type { TraceWarning } from '../schemas/trace-analysis';

export interface ParseOptions {
  /** Sample interval for single-column files (overrides the file's metadata). */
  sampleIntervalNs?: number;
  /** Time of the first sample for single-column files. */
  startNs?: number;
  /** Velocity factor the instrument used to write a distance column (overrides the metadata). */
  instrumentVf?: number;
  /** Unit of a distance column whose header names none. */
  distanceUnit?: 'm' | 'ft';
  /** Refuse files larger than this many bytes (UTF-8). Default 64 MiB. */
  maxBytes?: number;
  /** Refuse traces with fewer samples. Default 16. */
  minSamples?: number;
  /** Force the general csv-parse reader even for plain numeric rows. */
  reader?: 'auto' | 'csv-parse';
}

export type TraceLayoutKind = 'time-amplitude' | 'distance-amplitude' | 'index-amplitude' | 'amplitude-only';

export interface TraceLayout {
  kind: TraceLayoutKind;
  delimiter: ',' | ';' | 'tab' | 'whitespace' | 'none';
  decimalComma: boolean;
  headerLine: number | null;
  firstDataLine: number;
  lastDataLine: number;
  columns: string[];
  xColumn: string | null;
  amplitudeColumn: string;
  /** Unit the x column was written in (`ns`, `ft`, …), if any. */
  xUnit: string | null;
  reader: 'fast' | 'csv-parse';
  resampled: boolean;
}

/** Settings found in the file's metadata, already converted to SI-style units. */
export interface TraceHints {
  instrumentVf?: number;
  pulseWidthNs?: number;
  z0Ohm?: number;
  sampleIntervalNs?: number;
  startNs?: number;
}

export interface ParsedTrace {
  /** Round-trip time of each sample, in seconds, on a uniform grid. */
  timeS: Float64Array;
  amplitude: Float64Array;
  amplitudeUnit: 'V' | 'rho';
  metadata: Record<string, string>;
  hints: TraceHints;
  layout: TraceLayout;
  sourceDistanceUnit?: 'm' | 'ft';
  /** The velocity factor a distance column was converted back with. */
  instrumentVf?: number;
  warnings: TraceWarning[];
}

export const DEFAULT_MAX_BYTES = 64 * 1024 * 1024;
const DEFAULT_MIN_SAMPLES = 16;
const MAX_HEAD_LINES = 5000;

const DATA_SHAPED = /^[-+.\d"'][-+.,;\d\teE"' ]*$/;
const NUMERIC_CELL = /^[+-]?(\d+[.,]?\d*|[.,]\d+)([eE][+-]?\d+)?$/;
const NON_FINITE_CELL = /^[+-]?(nan|inf|infinity)$/i;

function utf8Length(text: string): number {
  let bytes = 0;
  for (let i = 0; i < text.length; i++) {
    const c = text.charCodeAt(i);
    if (c < 0x80) bytes += 1;
    else if (c < 0x800) bytes += 2;
    else if (c >= 0xd800 && c <= 0xdbff) {
      bytes += 4;
      i++;
    } else bytes += 3;
  }
  return bytes;
}

function unquote(s: string): string {
  const t = s.trim();
  if (t.length >= 2 && (t[0] === '"' || t[0] === "'") && t[t.length - 1] === t[0]) return t.slice(1, -1).trim();
  return t;
}

function isNumericCell(s: string): boolean {
  const t = unquote(s);
  return NUMERIC_CELL.test(t) || NON_FINITE_CELL.test(t);
}

function splitRow(row: string, delimiter: Delimiter): string[] {
  if (delimiter === null) return [unquote(row)];
  if (delimiter === 'whitespace') return row.trim().split(/[ \t]+/);
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

interface HeadRow {
  text: string;
  line: number;
  comment: boolean;
}

function commentBody(t: string): string | null {
  if (t.startsWith('//')) return t.slice(2).trim();
  if (t[0] === '#' || t[0] === '%' || t[0] === '!' || t[0] === '*') return t.replace(/^[#%!*]+/, '').trim();
  return null;
}

function splitKeyValue(s: string): [string, string] | null {
  const m = /^([^:=\t]+?)\s*[:=\t]\s*(.*)$/.exec(s);
  if (!m) return null;
  return [m[1].trim(), m[2].trim()];
}

const VF_KEYS = new Set([
  'vf',
  'velocity factor',
  'nvp',
  'vop',
  'velocity of propagation',
  'propagation velocity',
  'instrument vf',
  'cable vf',
  'vp',
]);
const DT_KEYS = new Set([
  'sample interval',
  'sampling interval',
  'sample period',
  'sampling period',
  'sample spacing',
  'dt',
  'delta t',
  'time step',
  'timestep',
  'time increment',
  'x increment',
  'xincrement',
  'time per sample',
  'interval',
  'time resolution',
  'sample time',
  'horizontal interval',
]);
const RATE_KEYS = new Set(['sample rate', 'sampling rate', 'sample frequency', 'sampling frequency', 'rate']);
const START_KEYS = new Set([
  'start',
  'start time',
  't0',
  'time offset',
  'x origin',
  'xorigin',
  'first sample time',
  'trigger offset',
  'time zero',
  'start of record',
]);
const PULSE_KEYS = new Set(['pulse width', 'pulse', 'pulse duration', 'pulse length', 'pulsewidth']);
const Z0_KEYS = new Set(['z0', 'impedance', 'characteristic impedance', 'nominal impedance', 'cable impedance', 'z']);
const AMP_UNIT_KEYS = new Set([
  'amplitude unit',
  'amplitude units',
  'y unit',
  'y units',
  'vertical unit',
  'vertical units',
  'units',
  'unit',
]);
const TIME_UNIT_KEYS = new Set(['time unit', 'time units', 'x unit', 'x units', 'horizontal unit', 'horizontal units']);
const DIST_UNIT_KEYS = new Set(['distance unit', 'distance units', 'length unit']);

interface MetaScan {
  hints: TraceHints;
  amplitudeUnit?: { unit: 'V' | 'rho'; scale: number };
  timeScale?: number;
  distanceUnit?: 'm' | 'ft';
}

function timeSeconds(value: string, keyUnit: string | null, key: string, line: number | undefined): number {
  const q = splitQuantity(value);
  if (!q)
    throw new TraceInputError('BAD_METADATA', `metadata '${key}' is '${value}'; expected a time such as '0.5 ns'`, { line });
  const unit = q.unit ?? keyUnit;
  if (unit === null) {
    if (Math.abs(q.number) < 1e-3) return q.number;
    throw new TraceInputError('BAD_METADATA', `metadata '${key}' is '${value}' with no unit; expected a time such as '0.5 ns'`, {
      line,
    });
  }
  const scale = timeUnitScale(unit);
  if (scale === undefined) {
    throw new TraceInputError('BAD_METADATA', `metadata '${key}' has unit '${unit}'; expected s, ms, us, ns or ps`, { line });
  }
  return q.number * scale;
}

function scanMetadata(meta: Array<{ key: string; value: string; line: number }>): MetaScan {
  const out: MetaScan = { hints: {} };
  for (const { key, value, line } of meta) {
    const { key: k, unit: keyUnit } = normaliseKey(key);
    if (VF_KEYS.has(k)) {
      const q = splitQuantity(value);
      if (!q) continue;
      let vf = q.number;
      const unit = q.unit ?? keyUnit;
      if (unit === '%' || (unit === null && vf >= 10 && vf <= 100)) vf /= 100;
      else if (unit === 'm/us' || unit === 'm/µs' || unit === 'm/μs') vf = (vf * 1e6) / SPEED_OF_LIGHT_M_PER_S;
      else if (unit === 'm/s') vf /= SPEED_OF_LIGHT_M_PER_S;
      if (!(vf > 0 && vf <= 1)) {
        throw new TraceInputError('BAD_METADATA', `metadata '${key}' is '${value}'; expected a velocity factor between 0 and 1`, {
          line,
        });
      }
      out.hints.instrumentVf = vf;
    } else if (DT_KEYS.has(k)) {
      const s = timeSeconds(value, keyUnit, key, line);
      if (!(s > 0))
        throw new TraceInputError('BAD_METADATA', `metadata '${key}' is '${value}'; expected a positive sample interval`, {
          line,
        });
      out.hints.sampleIntervalNs = s * 1e9;
    } else if (RATE_KEYS.has(k)) {
      const q = splitQuantity(value);
      const unit = (q?.unit ?? keyUnit ?? '').toLowerCase();
      const mult: Record<string, number> = {
        hz: 1,
        's/s': 1,
        khz: 1e3,
        mhz: 1e6,
        ghz: 1e9,
        'ks/s': 1e3,
        'ms/s': 1e6,
        'gs/s': 1e9,
        sa: 1,
        'sa/s': 1,
        'gsa/s': 1e9,
        'msa/s': 1e6,
      };
      if (q && q.number > 0 && unit in mult) out.hints.sampleIntervalNs = 1e9 / (q.number * mult[unit]);
    } else if (START_KEYS.has(k)) {
      out.hints.startNs = timeSeconds(value, keyUnit, key, line) * 1e9;
    } else if (PULSE_KEYS.has(k)) {
      const q = splitQuantity(value);
      if (q) out.hints.pulseWidthNs = timeSeconds(value, keyUnit ?? 'ns', key, line) * 1e9;
    } else if (Z0_KEYS.has(k)) {
      const q = splitQuantity(value.replace(/\s*(ohms?|Ω)\s*$/i, ''));
      if (q && q.number > 0) out.hints.z0Ohm = q.number;
    } else if (AMP_UNIT_KEYS.has(k)) {
      const info = interpretColumn(`amplitude (${value})`);
      if (info.amplitudeUnit && !info.unknownUnit) out.amplitudeUnit = { unit: info.amplitudeUnit, scale: info.scale };
    } else if (TIME_UNIT_KEYS.has(k)) {
      const s = timeUnitScale(value);
      if (s !== undefined) out.timeScale = s;
    } else if (DIST_UNIT_KEYS.has(k)) {
      const d = distanceUnitScale(value);
      if (d) out.distanceUnit = d.unit;
    }
  }
  return out;
}

/** Read a TDR trace from CSV text. Throws TraceInputError with a line number for anything it cannot read safely. */
export function parseTraceCsv(input: string, options: ParseOptions = {}): ParsedTrace {
  const maxBytes = options.maxBytes ?? DEFAULT_MAX_BYTES;
  const minSamples = options.minSamples ?? DEFAULT_MIN_SAMPLES;
  if (typeof input !== 'string') throw new TraceInputError('NOT_TEXT', 'the trace must be given as text');
  if (input.length > maxBytes || (input.length * 3 > maxBytes && utf8Length(input) > maxBytes)) {
    throw new TraceInputError(
      'FILE_TOO_LARGE',
      `the file is larger than the ${(maxBytes / 1048576).toFixed(maxBytes >= 1048576 ? 0 : 2)} MiB limit`,
    );
  }
  let text = input.charCodeAt(0) === 0xfeff ? input.slice(1) : input;
  if (text.trim() === '') throw new TraceInputError('EMPTY_FILE', 'the file is empty; expected a header and rows of numbers');
  if (text.slice(0, 65536).includes('\u0000')) {
    throw new TraceInputError('NOT_TEXT', 'the file is not text (it contains NUL bytes); expected a CSV export');
  }
  if (!text.includes('\n') && text.includes('\r')) text = text.replace(/\r/g, '\n');
  for (const [k, v] of [
    ['sampleIntervalNs', options.sampleIntervalNs],
    ['instrumentVf', options.instrumentVf],
  ] as const) {
    if (v !== undefined && !(Number.isFinite(v) && v > 0)) {
      throw new TraceInputError('BAD_OPTION', `${k} must be a positive number`, { field: k });
    }
  }
  if (options.instrumentVf !== undefined && options.instrumentVf > 1) {
    throw new TraceInputError('BAD_OPTION', 'instrumentVf must be between 0 and 1', { field: 'instrumentVf' });
  }

  // 1. Head: everything before the first line that looks like numbers.
  const head: HeadRow[] = [];
  let pos = 0;
  let line = 1;
  let dataStart = -1;
  let dataLine = -1;
  const n = text.length;
  while (pos < n) {
    const nl = text.indexOf('\n', pos);
    const end = nl < 0 ? n : nl;
    const raw = text.slice(pos, end);
    const t = raw.trim();
    if (t !== '') {
      const comment = commentBody(t);
      if (comment !== null) head.push({ text: comment, line, comment: true });
      else if (DATA_SHAPED.test(t) && /\d/.test(t)) {
        dataStart = pos;
        dataLine = line;
        break;
      } else head.push({ text: t, line, comment: false });
    }
    if (head.length > MAX_HEAD_LINES) break;
    pos = end + 1;
    line++;
  }
  if (dataStart < 0) {
    throw new TraceInputError('NO_NUMERIC_ROWS', 'no rows of numbers were found; expected numeric rows after the header');
  }

  // 2. Delimiter and decimal mark, from the first rows of numbers.
  const samples: string[] = [];
  {
    let p = dataStart;
    while (p < n && samples.length < 50) {
      const nl = text.indexOf('\n', p);
      const end = nl < 0 ? n : nl;
      const t = text.slice(p, end).trim();
      if (t !== '' && !t.startsWith('#')) samples.push(t);
      p = end + 1;
    }
  }
  let delimiter = detectDelimiter(samples);
  let decimalComma =
    (delimiter === ';' || delimiter === '\t' || delimiter === 'whitespace') && samples.some((s) => s.includes(','));
  const rows = head.filter((r) => !r.comment);
  const headDelimiter: Delimiter =
    delimiter ?? ([';', '\t', ','] as const).find((d) => rows.some((r) => r.text.includes(d))) ?? null;
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
  const columnCount = splitRow(samples[0], delimiter).length;

  // 3. Header (the last row before the numbers, if it is all names) and metadata.
  const metaEntries: Array<{ key: string; value: string; line: number }> = [];
  let header: string[] | null = null;
  let headerLine: number | null = null;
  const rowCells = rows.map((r) => splitRow(r.text, delimiter ?? headDelimiter));
  const allNames = (cells: string[]) => cells.every((c) => c !== '' && !isNumericCell(c));
  let headerIdx = -1;
  const headerRows = new Set<number>();
  // Rows of broken numbers (NaN, text) just above the first clean row belong to the data, not the header.
  let headRows = rows.length;
  while (headRows > 0 && rowCells[headRows - 1].length === columnCount && isNumericCell(rowCells[headRows - 1][0] ?? ''))
    headRows--;
  const lastHeadRow = headRows > 0 ? rows[headRows - 1] : undefined;
  if (lastHeadRow) {
    const lastRow = lastHeadRow;
    const cells = delimiter === null ? [unquote(lastRow.text)] : rowCells[headRows - 1];
    const looksKeyValue = cells.length === 1 && splitKeyValue(cells[0]) !== null && columnCount === 1 && /[:=]/.test(cells[0]);
    if (cells.length === columnCount && allNames(cells) && !looksKeyValue) {
      headerIdx = headRows - 1;
      headerRows.add(headerIdx);
      header = cells;
      headerLine = lastRow.line;
      // A units row under a names row ("Time,Voltage" then "s,V").
      if (headRows >= 2) {
        const prev = rowCells[headRows - 2];
        const unitsKnown = cells.every((u) => {
          const info = interpretColumn(`x (${u})`);
          return !info.unknownUnit && info.unit !== null;
        });
        if (unitsKnown && prev.length === columnCount && allNames(prev)) {
          header = prev.map((name, k) => `${name} (${cells[k]})`);
          headerIdx = headRows - 2;
          headerRows.add(headerIdx);
          headerLine = rows[headRows - 2].line;
        }
      }
    }
  }
  let notes = 0;
  for (const r of head) {
    if (r.comment) {
      const kv = splitKeyValue(r.text);
      if (kv) metaEntries.push({ key: kv[0], value: kv[1], line: r.line });
      else if (r.text !== '') metaEntries.push({ key: `note ${++notes}`, value: r.text, line: r.line });
    }
  }
  rows.forEach((r, idx) => {
    if (headerRows.has(idx)) return;
    const cells = rowCells[idx];
    if (cells.length > 0 && isNumericCell(cells[0]) && cells.length === columnCount) {
      // A broken row of data (NaN, text) before the first clean one.
      cells.forEach((c, k) => numberFromHead(c, decimalComma, r.line, header?.[k] ?? `${k + 1}`));
    }
    if (cells.length >= 2) metaEntries.push({ key: cells[0], value: cells.slice(1).join(' ').trim(), line: r.line });
    else {
      const kv = splitKeyValue(cells[0] ?? r.text);
      if (kv) metaEntries.push({ key: kv[0], value: kv[1], line: r.line });
      else metaEntries.push({ key: `note ${++notes}`, value: r.text, line: r.line });
    }
  });
  const metadata: Record<string, string> = {};
  for (const e of metaEntries) metadata[e.key] = e.value;
  const scan = scanMetadata(metaEntries);
  const warnings: TraceWarning[] = [];

  // 4. Column roles.
  const infos: ColumnInfo[] | null = header ? header.map(interpretColumn) : null;
  if (infos) {
    infos.forEach((info) => {
      if (info.unknownUnit) {
        const { unit } = splitNameAndUnit(info.name);
        throw new TraceInputError(
          'UNKNOWN_UNIT',
          `column '${info.name}' has unit '${unit}'; expected a time (s, ms, us, ns, ps), a distance (m, ft) or an amplitude (V, mV, rho)`,
          { line: headerLine ?? undefined, field: info.name },
        );
      }
    });
  }
  let xCol = -1;
  let ampCol = -1;
  if (columnCount >= 2) {
    if (infos) {
      xCol = infos.findIndex((c) => c.role === 'time' || c.role === 'distance');
      if (xCol < 0) xCol = infos.findIndex((c) => c.role === 'index');
      if (xCol < 0 && infos[0].role === 'unknown') xCol = 0;
      ampCol = infos.findIndex((c, k) => k !== xCol && c.role === 'amplitude');
      if (ampCol < 0) ampCol = infos.findIndex((c, k) => k !== xCol && c.role === 'unknown');
      if (ampCol < 0) {
        throw new TraceInputError('NO_AMPLITUDE_COLUMN', `no amplitude column among ${header!.map((h) => `'${h}'`).join(', ')}`, {
          line: headerLine ?? undefined,
        });
      }
    } else {
      xCol = 0;
      ampCol = 1;
    }
    const ignored = Array.from({ length: columnCount }, (_, k) => k).filter((k) => k !== xCol && k !== ampCol);
    if (ignored.length > 0) {
      warnings.push({
        code: 'EXTRA_COLUMNS',
        message: `only column ${header ? `'${header[ampCol]}'` : ampCol + 1} was analysed; ${ignored.length} other column(s) ignored`,
      });
    }
  } else {
    ampCol = 0;
  }

  // 5. Body.
  const keep = xCol >= 0 ? [xCol, ampCol] : [ampCol];
  // Size the arrays from the sample rows' average length; they grow if the guess is short.
  const avgLine = samples.reduce((a, r) => a + r.length + 1, 0) / samples.length;
  const newlines = Math.ceil(((n - dataStart) / Math.max(2, avgLine)) * 1.05) + 16;
  const spec: BodySpec = {
    text,
    start: dataStart,
    firstLine: dataLine,
    delimiter,
    decimalComma,
    columnCount,
    keep,
    columnNames: header ?? [],
    rowEstimate: newlines + 1,
  };
  let body: BodyColumns | null = options.reader === 'csv-parse' ? null : readBodyFast(spec);
  if (body === null) body = readBodyCsvParse(spec);
  const count = body.rows;
  if (count === 0)
    throw new TraceInputError('NO_NUMERIC_ROWS', 'no rows of numbers were found; expected numeric rows after the header');
  if (count < minSamples) {
    throw new TraceInputError(
      'TOO_FEW_SAMPLES',
      `only ${count} sample${count === 1 ? '' : 's'} found; at least ${minSamples} are needed`,
      {
        line: body.lastRowLine,
      },
    );
  }
  const amplitudeRaw = xCol >= 0 ? body.columns[1] : body.columns[0];
  const xRaw = xCol >= 0 ? body.columns[0] : null;

  // 6. Amplitude unit.
  const ampInfo = infos ? infos[ampCol] : undefined;
  let amplitudeUnit: 'V' | 'rho' = 'V';
  let ampScale = 1;
  if (ampInfo?.amplitudeUnit && ampInfo.unit !== null) {
    amplitudeUnit = ampInfo.amplitudeUnit;
    ampScale = ampInfo.scale;
  } else if (scan.amplitudeUnit) {
    amplitudeUnit = scan.amplitudeUnit.unit;
    ampScale = scan.amplitudeUnit.scale;
  } else if (ampInfo?.amplitudeUnit) {
    amplitudeUnit = ampInfo.amplitudeUnit;
    ampScale = ampInfo.scale;
  }
  const amplitude = amplitudeRaw;
  if (ampScale !== 1) for (let i = 0; i < count; i++) amplitude[i] *= ampScale;

  // 7. Time axis.
  const hints: TraceHints = { ...scan.hints };
  const xInfo: ColumnInfo | undefined = infos && xCol >= 0 ? infos[xCol] : undefined;
  let kind: TraceLayoutKind;
  let sourceDistanceUnit: 'm' | 'ft' | undefined;
  let instrumentVf: number | undefined;
  let timeS: Float64Array;
  const xLabel = xInfo ? `'${xInfo.name}'` : 'first';
  const dtNs = options.sampleIntervalNs ?? hints.sampleIntervalNs;
  const startNs = options.startNs ?? hints.startNs ?? 0;
  if (xRaw === null || xInfo?.role === 'index') {
    kind = xRaw === null ? 'amplitude-only' : 'index-amplitude';
    if (dtNs === undefined) {
      throw new TraceInputError(
        'MISSING_SAMPLE_INTERVAL',
        `the file has no time column and no sample interval; give one in the metadata (e.g. '# sample interval: 0.5 ns') or as an option`,
      );
    }
    timeS = new Float64Array(count);
    const dt = dtNs * 1e-9;
    const t0 = startNs * 1e-9;
    if (xRaw === null) for (let i = 0; i < count; i++) timeS[i] = t0 + i * dt;
    else for (let i = 0; i < count; i++) timeS[i] = t0 + xRaw[i] * dt;
  } else if (xInfo?.role === 'distance') {
    kind = 'distance-amplitude';
    const unit = xInfo.distanceUnit ?? scan.distanceUnit ?? options.distanceUnit;
    if (unit === undefined) {
      throw new TraceInputError(
        'MISSING_DISTANCE_UNIT',
        `distance column '${xInfo.name}' names no unit; expected metres or feet, e.g. 'distance (m)'`,
        { line: headerLine ?? undefined, field: xInfo.name },
      );
    }
    const vfInst = options.instrumentVf ?? hints.instrumentVf;
    if (vfInst === undefined) {
      throw new TraceInputError(
        'MISSING_VF',
        `distance column '${xInfo.name}' needs the velocity factor the instrument used; give it in the metadata (e.g. '# velocity factor: 0.66') or as an option`,
        { field: xInfo.name },
      );
    }
    sourceDistanceUnit = unit;
    instrumentVf = vfInst;
    const scale = (xInfo.unit !== null ? xInfo.scale : unit === 'ft' ? 0.3048 : 1) * (2 / (vfInst * SPEED_OF_LIGHT_M_PER_S));
    timeS = xRaw;
    for (let i = 0; i < count; i++) timeS[i] *= scale;
  } else {
    kind = 'time-amplitude';
    let scale = xInfo && xInfo.unit !== null ? xInfo.scale : scan.timeScale;
    if (scale === undefined) {
      const span = Math.max(Math.abs(xRaw[0]), Math.abs(xRaw[count - 1]));
      const step = (xRaw[count - 1] - xRaw[0]) / (count - 1);
      if (span < 1e-2 && step > 0 && step < 1e-6) {
        scale = 1;
        warnings.push({
          code: 'TIME_UNIT_ASSUMED',
          message: `the ${xLabel} column names no unit; its values were read as seconds`,
        });
      } else {
        throw new TraceInputError(
          'MISSING_TIME_UNIT',
          `the ${xLabel} column names no time unit; expected a header such as 'time (ns)' or 'time_s'`,
          { line: headerLine ?? dataLine },
        );
      }
    }
    timeS = xRaw;
    if (scale !== 1) for (let i = 0; i < count; i++) timeS[i] *= scale;
  }

  // 8. Checks: finite, strictly increasing, evenly spaced.
  const axisName = kind === 'distance-amplitude' ? 'distance' : 'time';
  for (let i = 1; i < count; i++) {
    const d = timeS[i] - timeS[i - 1];
    if (!(d > 0)) {
      const ln = body.lineOfRow(i);
      if (d === 0) {
        throw new TraceInputError(
          'DUPLICATE_TIME',
          `${axisName} repeats the previous row's value; expected each row to be later than the one before`,
          {
            line: ln,
          },
        );
      }
      throw new TraceInputError(
        'NON_MONOTONIC_TIME',
        `${axisName} goes backwards; expected each row to be later than the one before`,
        { line: ln },
      );
    }
  }
  let resampled = false;
  const meanDt = (timeS[count - 1] - timeS[0]) / (count - 1);
  let worst = 0;
  for (let i = 1; i < count; i++) worst = Math.max(worst, Math.abs(timeS[i] - timeS[i - 1] - meanDt));
  let outTime = timeS;
  let outAmp = amplitude;
  if (worst > 0.25 * meanDt) {
    // Uneven spacing (gaps or jitter beyond rounding): put the trace on a
    // uniform grid at the median step by linear interpolation.
    const diffs = new Float64Array(count - 1);
    for (let i = 1; i < count; i++) diffs[i - 1] = timeS[i] - timeS[i - 1];
    diffs.sort();
    const dt = diffs[(count - 1) >> 1];
    const m = Math.floor((timeS[count - 1] - timeS[0]) / dt) + 1;
    if (m > 8 * count || m > 20_000_000) {
      throw new TraceInputError(
        'NON_MONOTONIC_TIME',
        `${axisName} steps are very uneven (gaps of many samples); expected evenly spaced samples`,
      );
    }
    outTime = new Float64Array(m);
    outAmp = new Float64Array(m);
    let j = 0;
    for (let k = 0; k < m; k++) {
      const t = timeS[0] + k * dt;
      while (j < count - 2 && timeS[j + 1] < t) j++;
      const f = (t - timeS[j]) / (timeS[j + 1] - timeS[j]);
      outTime[k] = t;
      outAmp[k] = amplitude[j] + Math.min(1, Math.max(0, f)) * (amplitude[j + 1] - amplitude[j]);
    }
    resampled = true;
    warnings.push({
      code: 'RESAMPLED',
      message: `samples were unevenly spaced; the trace was put on an even ${(dt * 1e9).toPrecision(3)} ns grid`,
    });
  }

  return {
    timeS: outTime,
    amplitude: outAmp,
    amplitudeUnit,
    metadata,
    hints,
    layout: {
      kind,
      delimiter: delimiter === null ? 'none' : delimiter === '\t' ? 'tab' : delimiter,
      decimalComma,
      headerLine,
      firstDataLine: body.firstRowLine,
      lastDataLine: body.lastRowLine,
      columns: header ?? [],
      xColumn: xCol >= 0 ? (header?.[xCol] ?? null) : null,
      amplitudeColumn: header?.[ampCol] ?? 'amplitude',
      xUnit: xInfo?.unit ?? null,
      reader: body.reader,
      resampled,
    },
    ...(sourceDistanceUnit ? { sourceDistanceUnit } : {}),
    ...(instrumentVf !== undefined ? { instrumentVf } : {}),
    warnings,
  };
}

function numberFromHead(cell: string, decimalComma: boolean, line: number, column: string): void {
  const s = decimalComma ? cell.replace(',', '.') : cell;
  if (NON_FINITE_CELL.test(s.trim())) {
    throw new TraceInputError(
      'NOT_FINITE',
      `value '${cell}' in column '${column}' is not a finite number; expected a measured value`,
      {
        line,
        field: column,
      },
    );
  }
  if (!NUMERIC_CELL.test(s.trim())) {
    throw new TraceInputError('NOT_A_NUMBER', `'${cell}' in column '${column}' is not a number`, { line, field: column });
  }
}
