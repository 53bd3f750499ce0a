/**
 * Reading a TDR trace from CSV in the layouts instruments and oscilloscopes
 * write: time + amplitude, distance + amplitude, amplitude alone with the
 * sample interval in the metadata, or a time column and several channels;
 * comma, semicolon, tab or blank-separated; decimal commas with semicolon or
 * tab delimiters; metadata before the header as comments or rows.
 *
 * The steps, each its own module:
 *   bytes (lines.ts) → head and first rows (head.ts) → columns (layout.ts)
 *   → settings (metadata.ts) → numbers (numeric-rows.ts) → time axis (axis.ts)
 */
import { buildTimeAxis, evenlySpaced } from './axis';
import { TraceInputError } from './errors';
import { readHead } from './head';
import { amplitudeUnitOf, planColumns, readLayout } from './layout';
import { DEFAULT_MAX_BYTES, estimateLines, traceBytes } from './lines';
import { metadataEntries, type MetaScan, readMetadata } from './metadata';
import { type BodySpec, readBody } from './numeric-rows';
import type { ParseOptions, ParsedTrace } from './reader-types';
import { percentileOf, sortedSample } from './stats';
import type { ColumnInfo } from './units';

export type { ParseOptions, ParsedTrace, TraceChannel, TraceHints, TraceLayout, TraceLayoutKind } from './reader-types';
export { DEFAULT_MAX_BYTES, MAX_COLUMNS, MAX_DATA_LINE_BYTES, MAX_HEAD_LINES, MAX_HEADER_LINE_BYTES } from './lines';

const DEFAULT_MIN_SAMPLES = 16;

function checkOptions(options: ParseOptions): void {
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
  const ch = options.channel;
  if (ch !== undefined && !(typeof ch === 'string' ? ch.trim() !== '' : Number.isInteger(ch))) {
    throw new TraceInputError('BAD_OPTION', 'channel must be a column name or a whole number', { field: 'channel' });
  }
}

/**
 * The factor to seconds of an x column read as time, when the header or metadata names its unit
 * (as buildTimeAxis would take it); undefined for an index or distance column, or an unnamed unit.
 */
function knownTimeScale(xInfo: ColumnInfo | undefined, scan: MetaScan): number | undefined {
  if (xInfo?.role === 'index' || xInfo?.role === 'distance') return undefined;
  return xInfo && xInfo.unit !== null ? xInfo.scale : scan.timeScale;
}

/**
 * Read a TDR trace from CSV, given as text or as the file's bytes (faster:
 * the numbers are read straight from the bytes). Throws TraceInputError with
 * a line number for anything it cannot read safely.
 */
export function parseTraceCsv(input: string | Uint8Array, options: ParseOptions = {}): ParsedTrace {
  const src = traceBytes(input, options.maxBytes ?? DEFAULT_MAX_BYTES);
  checkOptions(options);
  const head = readHead(src);
  const layout = readLayout(head);
  const entries = metadataEntries(layout.metaRows);
  const scan = readMetadata(entries);
  const plan = planColumns(layout, options.channel);

  const keep = plan.xCol >= 0 ? [plan.xCol, plan.ampCol] : [plan.ampCol];
  // Units known from the header and metadata are applied as the numbers are stored, not in passes
  // of their own afterwards: the amplitude's, and a time column's when its unit is named.
  const xInfo = plan.infos && plan.xCol >= 0 ? plan.infos[plan.xCol] : undefined;
  const amp = amplitudeUnitOf(plan.infos?.[plan.ampCol], scan.amplitudeUnit);
  const xScale = plan.xCol >= 0 ? knownTimeScale(xInfo, scan) : undefined;
  const spec: BodySpec = {
    bytes: src.bytes,
    start: head.dataStart,
    firstLine: head.dataLine,
    delimiter: layout.delimiter,
    decimalComma: layout.decimalComma,
    columnCount: layout.columnCount,
    keep,
    columnNames: layout.header ?? [],
    // Sized from the length of lines through the file; the arrays grow if the guess is short.
    rowEstimate: estimateLines(src.bytes, head.dataStart),
    scales: plan.xCol >= 0 ? [xScale ?? 1, amp.scale] : [amp.scale],
  };
  const body = readBody(spec, options.reader === 'csv-parse');
  const count = body.rows;
  const minSamples = options.minSamples ?? DEFAULT_MIN_SAMPLES;
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

  const amplitude = plan.xCol >= 0 ? body.columns[1] : body.columns[0];
  refuseGlitch(amplitude, body.lineOfRow, plan.channel.name);

  const axis = buildTimeAxis({
    x: plan.xCol >= 0 ? body.columns[0] : null,
    xInfo,
    xInSeconds: xScale !== undefined,
    count,
    scan,
    options,
    headerLine: layout.headerLine,
    dataLine: head.dataLine,
  });
  const axisName = axis.kind === 'distance-amplitude' ? 'distance' : 'time';
  // One pass: refuse a time that repeats or goes back (naming its line), and measure the spacing.
  const even = evenlySpaced(axis.timeS, amplitude, axisName, body.lineOfRow);

  const metadata: Record<string, string> = {};
  for (const e of entries) metadata[e.key] = e.value;
  const header = layout.header;
  return {
    timeS: even.timeS,
    amplitude: even.amplitude,
    amplitudeUnit: amp.unit,
    metadata,
    hints: { ...scan.hints },
    layout: {
      kind: axis.kind,
      delimiter: layout.delimiter === null ? 'none' : layout.delimiter === '\t' ? 'tab' : layout.delimiter,
      decimalComma: layout.decimalComma,
      headerLine: layout.headerLine,
      firstDataLine: body.firstRowLine,
      lastDataLine: body.lastRowLine,
      columns: header ?? [],
      xColumn: plan.xCol >= 0 ? (header?.[plan.xCol] ?? null) : null,
      amplitudeColumn: plan.channel.name,
      xUnit: plan.infos?.[plan.xCol]?.unit ?? null,
      reader: body.reader,
      resampled: even.resampled,
    },
    ...(axis.sourceDistanceUnit ? { sourceDistanceUnit: axis.sourceDistanceUnit } : {}),
    ...(axis.instrumentVf !== undefined ? { instrumentVf: axis.instrumentVf } : {}),
    channel: plan.channel,
    warnings: [...plan.warnings, ...axis.warnings, ...(even.warning ? [even.warning] : [])],
  };
}

/**
 * How far past the rest of the trace one amplitude may lie before it is a recorder's glitch rather than a
 * reading: a million times the spread of the 99.9 % of samples nearest the median (120 dB; no recorder's
 * launch stands that far out of its own baseline and noise, common practice). One such sample would set
 * the scale the whole record is read at and hide every real reflection in it.
 */
const GLITCH_RATIO = 1e6;

function refuseGlitch(y: Float64Array, lineOfRow: (row: number) => number, column: string | null | undefined): void {
  const sorted = sortedSample(y);
  const mid = percentileOf(sorted, 0.5);
  const dev = new Float64Array(sorted.length);
  for (let i = 0; i < sorted.length; i++) dev[i] = Math.abs(sorted[i] - mid);
  dev.sort();
  const spread = percentileOf(dev, 0.999);
  if (!(spread > 0)) return;
  const limit = GLITCH_RATIO * spread;
  for (let i = 0; i < y.length; i++) {
    if (Math.abs(y[i] - mid) > limit) {
      throw new TraceInputError(
        'GLITCH_SAMPLE',
        `the amplitude ${y[i].toPrecision(3)}${column ? ` in column '${column}'` : ''} is more than a million times beyond the rest of the trace (around ${mid.toPrecision(3)}); it is a recorder glitch or an over-range code, not a reading: fix or remove that row`,
        { line: lineOfRow(i) },
      );
    }
  }
}
