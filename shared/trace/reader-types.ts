/** The shapes the trace reader takes and gives back. */
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
  /**
   * Which amplitude column to read from a file with several (an oscilloscope
   * export with one column per channel): its header name (with or without the
   * unit, any case) or its 1-based number among the amplitude columns.
   * Default: the first amplitude column.
   */
  channel?: string | number;
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

/** The amplitude column that was read, out of those the file offers. */
export interface TraceChannel {
  /** Its header name, or `column N` when the file has no header. */
  name: string;
  /** Its 1-based number among `available` (what `ParseOptions.channel` takes). */
  index: number;
  /** Every amplitude column in the file, in file order. */
  available: string[];
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
  /** Which amplitude column was read. */
  channel?: TraceChannel;
  warnings: TraceWarning[];
}
