/**
 * Rholog trace engine: read a TDR trace from CSV, find its reflection events
 * and turn round-trip time into distance with an uncertainty window.
 * Pure TypeScript with no Node-only or DOM-only APIs. CSV is read with
 * csv-parse's browser build (it bundles its own Buffer shim), so parsing works
 * on the server and in the browser alike.
 */
import { analyzeTrace, type AnalyzeOptions } from './analyze';
import { parseTraceCsv, type ParseOptions } from './parse';
import type { TraceAnalysis } from '../schemas/trace-analysis';

export { analyzeTrace, MAX_FITTED_CANDIDATES, type AnalyzeOptions } from './analyze';
export {
  parseTraceCsv,
  DEFAULT_MAX_BYTES,
  MAX_COLUMNS,
  MAX_DATA_LINE_BYTES,
  MAX_HEADER_LINE_BYTES,
  MAX_HEAD_LINES,
  type ParseOptions,
  type ParsedTrace,
  type TraceChannel,
  type TraceLayout,
  type TraceHints,
} from './parse';
export { TraceInputError, MAX_MESSAGE_CHARS, type TraceInputErrorCode } from './errors';
export { decimateMinMax, type TracePoint } from './decimate';
export { ENGINE_VERSION } from './version';
export { reflectionFromImpedance, impedanceFromReflection } from './impedance';
export type { TraceAnalysis, ReflectionEvent, ReflectionType, TraceWarning } from '../schemas/trace-analysis';

/** Parse and analyse in one call; bytes are read faster than text. */
export function analyzeCsv(
  text: string | Uint8Array,
  parseOptions: ParseOptions | undefined,
  analyzeOptions: AnalyzeOptions,
): TraceAnalysis {
  return analyzeTrace(parseTraceCsv(text, parseOptions), analyzeOptions);
}
