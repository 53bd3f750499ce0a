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

export { analyzeTrace, type AnalyzeOptions } from './analyze';
export {
  parseTraceCsv,
  DEFAULT_MAX_BYTES,
  type ParseOptions,
  type ParsedTrace,
  type TraceLayout,
  type TraceHints,
} from './parse';
export { TraceInputError, type TraceInputErrorCode } from './errors';
export { decimateMinMax, type TracePoint } from './decimate';
export { ENGINE_VERSION } from './version';
export { reflectionFromImpedance, impedanceFromReflection } from './impedance';
export type { TraceAnalysis, ReflectionEvent, ReflectionType, TraceWarning } from '../schemas/trace-analysis';

/** Parse and analyse in one call. */
export function analyzeCsv(text: string, parseOptions: ParseOptions | undefined, analyzeOptions: AnalyzeOptions): TraceAnalysis {
  return analyzeTrace(parseTraceCsv(text, parseOptions), analyzeOptions);
}
