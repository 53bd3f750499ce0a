import type { TraceAnalysis } from '../../shared/schemas/trace-analysis';
import type { TraceSettings } from '../../shared/schemas/traces';
import { analyzeTrace, parseTraceCsv, TraceInputError, type ParsedTrace } from '../../shared/trace';
import { libraryAnalysisOptions, type LibraryLoss } from '../cables/cable-loss';
import { capMessage, MAX_MESSAGE_CHARS } from '../http/messages';

/** The cable values an analysis uses, as plain data (it crosses into a worker thread). */
export type AnalysisCable = { vf: number; vfTolerance: number; z0Ohm: number | null } & LibraryLoss;

export interface TraceOutcomeError {
  code: string;
  /** At most 300 characters: it is stored and shown. */
  message: string;
  line: number | null;
  field: string | null;
}

export interface Outcome {
  status: 'ok' | 'failed';
  analysis: TraceAnalysis | null;
  error: TraceOutcomeError | null;
  /** For the server log only: what went wrong inside the engine. */
  internal?: string;
}

/**
 * The engine's warnings as Rholog stores and shows them: each message cut to
 * 300 characters (and each code to 60), however much of the file a message
 * quotes. Applied where an analysis leaves the engine and where a stored one
 * is sent back, so rows written before the cap are bounded too.
 */
export function boundedAnalysis<A extends TraceAnalysis | null>(analysis: A): A {
  if (!analysis) return analysis;
  const long = analysis.warnings.some((w) => w.message.length > MAX_MESSAGE_CHARS || w.code.length > 60);
  if (!long) return analysis;
  return { ...analysis, warnings: analysis.warnings.map((w) => ({ ...w, code: capMessage(w.code, 60), message: capMessage(w.message) })) };
}

export function failedOutcome(code: string, message: string, extra: Partial<TraceOutcomeError> = {}): Outcome {
  return { status: 'failed', analysis: null, error: { code, message: capMessage(message), line: extra.line ?? null, field: extra.field ?? null } };
}

export function parseOptions(settings: TraceSettings, maxBytes: number) {
  return { maxBytes, ...(settings.sampleIntervalNs !== undefined ? { sampleIntervalNs: settings.sampleIntervalNs } : {}) };
}

/**
 * Parse and analyse one file with the run's cable values; a file the engine
 * cannot read becomes a failed outcome in the engine's own words (cut to 300
 * characters). Runs in an analysis worker, never on the request thread, and
 * in a Web Worker on a phone that analyses a file before uploading it.
 */
export function analyseBytes(bytes: Uint8Array, settings: TraceSettings, cable: AnalysisCable, maxBytes: number): { outcome: Outcome; parsed: ParsedTrace | null } {
  let parsed: ParsedTrace | null = null;
  try {
    parsed = readBytes(bytes, settings, maxBytes);
    const analysis = analyzeTrace(parsed, {
      ...libraryAnalysisOptions(cable, settings.pulseWidthNs ?? parsed.hints.pulseWidthNs, settings.vfOverride),
      vfTolerance: cable.vfTolerance,
      ...(cable.z0Ohm ? { z0Ohm: cable.z0Ohm } : {}),
      mode: settings.mode,
      ...(settings.zeroOffsetNs !== undefined ? { zeroOffsetNs: settings.zeroOffsetNs } : {}),
      ...(settings.leadLengthM !== undefined ? { leadLengthM: settings.leadLengthM } : {}),
      ...(settings.pulseWidthNs !== undefined ? { pulseWidthNs: settings.pulseWidthNs } : {}),
    });
    return { outcome: { status: 'ok', analysis: boundedAnalysis(analysis), error: null }, parsed };
  } catch (err) {
    if (err instanceof TraceInputError) {
      return { outcome: failedOutcome(err.code, err.message, { line: err.line ?? null, field: err.field ?? null }), parsed: null };
    }
    const outcome = {
      ...failedOutcome('ENGINE_ERROR', `The trace engine could not analyse this file (${(err as Error)?.message ?? String(err)}).`),
      internal: String((err as Error)?.stack ?? err),
    };
    return { outcome, parsed: null };
  }
}

/** The samples of a file, read with the settings it was uploaded with. */
export function readBytes(bytes: Uint8Array, settings: TraceSettings, maxBytes: number): ParsedTrace {
  return parseTraceCsv(bytes, parseOptions(settings, maxBytes));
}
