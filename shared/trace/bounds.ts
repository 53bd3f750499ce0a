/**
 * Physical bounds on a record's time axis, checked before any analysis.
 *
 * A CSV can carry any number, so a file's time column can claim samples
 * 1e300 ns apart (a "record" longer than the age of the universe) or 1e-300 ns
 * apart (every event at a fraction of an atom's width, with a 0 m window).
 * Both give distances no cable has, and numbers that overflow further on.
 * The engine refuses such a record in the file's own terms (its time column
 * and line) instead of reporting an event nobody could dig for.
 *
 * - Shortest sample interval: 1 fs (1e-15 s). Equivalent-time sampling
 *   oscilloscopes used for TDR step in tens of femtoseconds at the finest
 *   (common practice); 1 fs is 0.15 µm of line at VF 1, far below any
 *   meaningful resolution, so nothing real is refused.
 * - Longest record: 2 ms of round trip (2e-3 s). At VF 1 that is
 *   c·t/2 ≈ 300 km of line, at a typical VF of 0.66 about 200 km: longer than
 *   any cable section tested from one end (long-range instruments reach on the
 *   order of 100 km; from memory), with room for a record that runs on past
 *   the cable's end.
 */
import { TraceInputError } from './errors';
import type { ParsedTrace } from './reader-types';

/** Shortest sample interval a record may have, in seconds (1 fs). */
export const MIN_SAMPLE_INTERVAL_S = 1e-15;
/** Longest round-trip time a record may span, in seconds (2 ms ≈ 300 km of line at VF 1). */
export const MAX_RECORD_SPAN_S = 2e-3;

function seconds(s: number): string {
  return `${Number(s.toPrecision(3))} s`;
}

/**
 * Refuse a record whose time axis no instrument could have written: a
 * sample interval that is not a finite number of at least 1 fs, or a record
 * spanning more than 2 ms of round trip. Throws TraceInputError naming the
 * time column (or the sample interval, for a file without one) and the line.
 */
export function checkTimeAxisBounds(trace: ParsedTrace): void {
  const t = trace.timeS;
  const n = t.length;
  if (n < 2) return;
  const layout = trace.layout;
  const axisName = layout?.kind === 'distance-amplitude' ? 'distance' : 'time';
  const column = layout?.xColumn ?? null;
  const what = column !== null ? `the ${axisName} column '${column}'` : 'the sample interval';
  const field = column ?? 'sampleIntervalNs';
  const firstLine = layout?.firstDataLine;
  const lastLine = layout?.lastDataLine;
  const span = t[n - 1] - t[0];
  const dt = span / (n - 1);
  if (!Number.isFinite(span) || !Number.isFinite(dt)) {
    throw new TraceInputError('IMPLAUSIBLE_TIME_AXIS', `${what} does not give finite times`, {
      field,
      ...(lastLine !== undefined ? { line: lastLine } : {}),
    });
  }
  if (!(dt >= MIN_SAMPLE_INTERVAL_S)) {
    throw new TraceInputError(
      'IMPLAUSIBLE_TIME_AXIS',
      `${what} puts samples ${seconds(dt)} apart; no instrument samples finer than 1 fs (1e-15 s), so the time unit or values are wrong`,
      { field, ...(firstLine !== undefined ? { line: column !== null ? firstLine + 1 : firstLine } : {}) },
    );
  }
  if (span > MAX_RECORD_SPAN_S) {
    throw new TraceInputError(
      'IMPLAUSIBLE_TIME_AXIS',
      `${what} spans ${seconds(span)} of round trip; a record longer than 2 ms (about 300 km of line) is not a cable's, so the time unit or values are wrong`,
      { field, ...(lastLine !== undefined ? { line: lastLine } : {}) },
    );
  }
}
