import { TraceInputError } from '../../shared/trace';

/**
 * The TraceInputError that `run` throws. Any other error is thrown on, and a
 * run that returns normally fails the test, so a check that the reader or the
 * engine refuses bad input cannot pass by accident.
 */
export function traceInputError(run: () => unknown): TraceInputError {
  try {
    run();
  } catch (err) {
    if (err instanceof TraceInputError) return err;
    throw err;
  }
  throw new Error('finished without a TraceInputError');
}
