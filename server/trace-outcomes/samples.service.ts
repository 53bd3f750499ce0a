import type { SampleWindowView } from '../../shared/schemas/trace-outcomes';
import { decimateMinMax } from '../../shared/trace';
import type { AppContext } from '../context';
import { Trace } from '../db/models';
import { AppError } from '../errors';
import { parsedSamples, pendingConflict } from '../traces/traces.service';

/** First index whose value is at least `v` in an ascending array. */
function lowerBound(a: Float64Array, v: number): number {
  let lo = 0;
  let hi = a.length;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if (a[mid] < v) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

/**
 * The samples of a trace between two times, min/max decimated to the points
 * asked for: a zoomed view drawn at the file's own detail however long the
 * record, with one sample either side so the line reaches the window's edges.
 */
export async function sampleWindow(ctx: AppContext, id: number, q: { fromNs: number; toNs: number; points: number }): Promise<SampleWindowView> {
  const trace = await Trace.findByPk(id);
  if (!trace) throw AppError.notFound(`Trace ${id}`);
  if (trace.status === 'pending') throw pendingConflict(id, 'drawn');
  if (trace.status !== 'ok') throw new AppError(422, 'trace_failed', `Trace ${id} could not be read, so it has no samples to draw.`);
  const parsed = await parsedSamples(ctx, trace);
  if (!parsed) throw new AppError(422, 'trace_failed', `Trace ${id} could not be read again from its stored file.`);
  const t = parsed.timeS;
  const from = Math.max(0, lowerBound(t, q.fromNs * 1e-9) - 1);
  const to = Math.min(t.length, lowerBound(t, q.toNs * 1e-9) + 1);
  const x = new Float64Array(Math.max(0, to - from));
  for (let i = 0; i < x.length; i++) x[i] = t[from + i] * 1e9;
  const y = parsed.amplitude.subarray(from, to);
  return {
    fromNs: q.fromNs,
    toNs: q.toNs,
    samples: decimateMinMax(x, y, q.points).map((p) => ({ t: p.x, y: p.y })),
    samplesInWindow: x.length,
  };
}
