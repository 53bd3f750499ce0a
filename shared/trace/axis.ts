/**
 * The time axis: round-trip time of every sample in seconds, from a time
 * column, a distance column (converted back with the velocity factor the
 * instrument used), a sample-index column or the sample interval alone; then
 * checked to rise and, when unevenly spaced, put on a uniform grid.
 */
import { M_PER_FT, roundTripFromDistance } from '../cable/propagation';
import type { TraceWarning } from '../schemas/trace-analysis';
import { shorten, TraceInputError } from './errors';
import type { MetaScan } from './metadata';
import type { ParseOptions, TraceLayoutKind } from './reader-types';
import type { ColumnInfo } from './units';

export interface AxisInput {
  /** The x column's values as read (converted in place), or null for amplitude alone. */
  x: Float64Array | null;
  xInfo: ColumnInfo | undefined;
  /** A time column already converted to seconds as it was read (its unit was named). */
  xInSeconds?: boolean;
  count: number;
  scan: MetaScan;
  options: ParseOptions;
  headerLine: number | null;
  dataLine: number;
}

export interface Axis {
  timeS: Float64Array;
  kind: TraceLayoutKind;
  sourceDistanceUnit?: 'm' | 'ft';
  instrumentVf?: number;
  warnings: TraceWarning[];
}

/** Evenly spaced times from the sample interval: amplitude alone, or a sample-index column. */
function axisFromInterval(a: AxisInput): Axis {
  const dtNs = a.options.sampleIntervalNs ?? a.scan.hints.sampleIntervalNs;
  const startNs = a.options.startNs ?? a.scan.hints.startNs ?? 0;
  if (dtNs === undefined) {
    throw new TraceInputError(
      'MISSING_SAMPLE_INTERVAL',
      `the file has no time column and no sample interval; give one in the metadata (e.g. '# sample interval: 0.5 ns') or as an option`,
    );
  }
  const timeS = a.x ?? new Float64Array(a.count);
  const dt = dtNs * 1e-9;
  const t0 = startNs * 1e-9;
  if (a.x === null) for (let i = 0; i < a.count; i++) timeS[i] = t0 + i * dt;
  else for (let i = 0; i < a.count; i++) timeS[i] = t0 + timeS[i] * dt;
  return { timeS, kind: a.x === null ? 'amplitude-only' : 'index-amplitude', warnings: [] };
}

/** Round-trip times from a distance column: t = 2·d / (VF·c) with the instrument's VF. */
function axisFromDistance(a: AxisInput, xInfo: ColumnInfo, x: Float64Array): Axis {
  const name = shorten(xInfo.name);
  const unit = xInfo.distanceUnit ?? a.scan.distanceUnit ?? a.options.distanceUnit;
  if (unit === undefined) {
    throw new TraceInputError(
      'MISSING_DISTANCE_UNIT',
      `distance column '${name}' names no unit; expected metres or feet, e.g. 'distance (m)'`,
      {
        line: a.headerLine ?? undefined,
        field: xInfo.name,
      },
    );
  }
  const vf = a.options.instrumentVf ?? a.scan.hints.instrumentVf;
  if (vf === undefined) {
    throw new TraceInputError(
      'MISSING_VF',
      `distance column '${name}' needs the velocity factor the instrument used; give it in the metadata (e.g. '# velocity factor: 0.66') or as an option`,
      { field: xInfo.name },
    );
  }
  const metres = xInfo.unit !== null ? xInfo.scale : unit === 'ft' ? M_PER_FT : 1;
  const secondsPerUnit = roundTripFromDistance(metres, vf);
  for (let i = 0; i < a.count; i++) x[i] *= secondsPerUnit;
  return { timeS: x, kind: 'distance-amplitude', sourceDistanceUnit: unit, instrumentVf: vf, warnings: [] };
}

/** Times from a time column, in the unit its title or the metadata names; bare small values are read as seconds. */
function axisFromTime(a: AxisInput, x: Float64Array): Axis {
  const warnings: TraceWarning[] = [];
  const xLabel = a.xInfo ? `'${shorten(a.xInfo.name)}'` : 'first';
  let scale = a.xInfo && a.xInfo.unit !== null ? a.xInfo.scale : a.scan.timeScale;
  if (scale === undefined) {
    const n = a.count;
    const span = Math.max(Math.abs(x[0]), Math.abs(x[n - 1]));
    const step = (x[n - 1] - x[0]) / (n - 1);
    if (!(span < 1e-2 && step > 0 && step < 1e-6)) {
      throw new TraceInputError(
        'MISSING_TIME_UNIT',
        `the ${xLabel} column names no time unit; expected a header such as 'time (ns)' or 'time_s'`,
        { line: a.headerLine ?? a.dataLine },
      );
    }
    scale = 1;
    warnings.push({ code: 'TIME_UNIT_ASSUMED', message: `the ${xLabel} column names no unit; its values were read as seconds` });
  }
  if (scale !== 1 && !a.xInSeconds) for (let i = 0; i < a.count; i++) x[i] *= scale;
  return { timeS: x, kind: 'time-amplitude', warnings };
}

/** Build the time axis in seconds, converting the x column in place. */
export function buildTimeAxis(a: AxisInput): Axis {
  if (a.x === null || a.xInfo?.role === 'index') return axisFromInterval(a);
  if (a.xInfo?.role === 'distance') return axisFromDistance(a, a.xInfo, a.x);
  return axisFromTime(a, a.x);
}

/** The error for a step d ≤ 0 (or not a number) of the time axis at a row on `line`. */
function notRising(d: number, axisName: string, line: number): TraceInputError {
  if (d === 0) {
    return new TraceInputError(
      'DUPLICATE_TIME',
      `${axisName} repeats the previous row's value; expected each row to be later than the one before`,
      { line },
    );
  }
  return new TraceInputError(
    'NON_MONOTONIC_TIME',
    `${axisName} goes backwards; expected each row to be later than the one before`,
    {
      line,
    },
  );
}

export interface EvenTrace {
  timeS: Float64Array;
  amplitude: Float64Array;
  resampled: boolean;
  warning?: TraceWarning;
}

/** Largest departure of a step from meanDt. */
function spread(timeS: Float64Array, meanDt: number): number {
  let worst = 0;
  for (let i = 1; i < timeS.length; i++) worst = Math.max(worst, Math.abs(timeS[i] - timeS[i - 1] - meanDt));
  return worst;
}

/** spread, refusing the first step that is not later than the one before (checkRising in the same pass). */
function risingSpread(timeS: Float64Array, meanDt: number, axisName: string, lineOfRow: (row: number) => number): number {
  let worst = 0;
  for (let i = 1; i < timeS.length; i++) {
    const d = timeS[i] - timeS[i - 1];
    if (!(d > 0)) throw notRising(d, axisName, lineOfRow(i));
    worst = Math.max(worst, Math.abs(d - meanDt));
  }
  return worst;
}

/**
 * Uneven spacing (gaps or jitter beyond a quarter of a step): put the trace
 * on a uniform grid at the median step by linear interpolation. Evenly spaced
 * traces are returned as they are.
 */
export function evenlySpaced(
  timeS: Float64Array,
  amplitude: Float64Array,
  axisName: string,
  lineOfRow?: (row: number) => number,
): EvenTrace {
  const count = timeS.length;
  const meanDt = (timeS[count - 1] - timeS[0]) / (count - 1);
  // With lineOfRow, the same pass refuses a repeat or a step back first, as checkRising does.
  const worst = lineOfRow ? risingSpread(timeS, meanDt, axisName, lineOfRow) : spread(timeS, meanDt);
  if (worst <= 0.25 * meanDt) return { timeS, amplitude, resampled: false };
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
  const outTime = new Float64Array(m);
  const outAmp = new Float64Array(m);
  let j = 0;
  for (let k = 0; k < m; k++) {
    const t = timeS[0] + k * dt;
    while (j < count - 2 && timeS[j + 1] < t) j++;
    const f = (t - timeS[j]) / (timeS[j + 1] - timeS[j]);
    outTime[k] = t;
    outAmp[k] = amplitude[j] + Math.min(1, Math.max(0, f)) * (amplitude[j + 1] - amplitude[j]);
  }
  return {
    timeS: outTime,
    amplitude: outAmp,
    resampled: true,
    warning: {
      code: 'RESAMPLED',
      message: `samples were unevenly spaced; the trace was put on an even ${(dt * 1e9).toPrecision(3)} ns grid`,
    },
  };
}
