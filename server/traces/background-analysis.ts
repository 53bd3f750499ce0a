import { literal, Op } from 'sequelize';
import type { AppContext } from '../context';
import { CableRun, CableType, Trace } from '../db/models';
import { JobReleased } from '../jobs/queue';
import { RawFileChanged, RawFileMissing } from '../storage';
import { failedOutcome, type Outcome } from './analysis';
import { analysisPool } from './analysis-pool';
import { analysisCable, analysisColumns, queueAnalyses, rememberParsed, TRACE_ANALYSIS_JOB } from './traces.service';

/**
 * Tries of one pending trace's analysis before it is marked failed. The job
 * kind allows one run more than this, so a last try lost with its instance is
 * still followed by a run that records the failure: no trace stays pending.
 */
export const ANALYSIS_MAX_TRIES = 4;

/** Outcomes that say nothing about the file, only that the server was busy: tried again, not stored. */
const TRY_AGAIN = new Set(['ANALYSIS_NOT_STARTED']);

interface AnalysisJob {
  traceId: number;
}

/**
 * Take a pending trace for this instance: one conditional UPDATE counts the
 * try and sets the lease. Of two instances given the same trace, the second
 * finds the lease held and leaves it; a lease whose instance died runs out,
 * and the job's retry (or the next start-up) takes the trace over.
 */
async function claim(ctx: AppContext, traceId: number): Promise<Trace | null> {
  const now = new Date();
  const [claimed] = await Trace.update(
    {
      analysisAttempts: literal('analysis_attempts + 1'),
      analysisLeaseUntil: new Date(now.getTime() + ctx.config.jobs.leaseSeconds * 1000),
    },
    {
      where: {
        id: traceId,
        status: 'pending',
        [Op.or]: [{ analysisLeaseUntil: null }, { analysisLeaseUntil: { [Op.lte]: now } }],
      },
    },
  );
  return claimed === 1 ? Trace.findByPk(traceId) : null;
}

/** Record the outcome, once: only a trace still pending is written. */
async function record(trace: Trace, outcome: Outcome, cable: CableType | null): Promise<boolean> {
  const columns = cable
    ? analysisColumns(outcome, cable, trace.settings)
    : {
        status: outcome.status,
        errorCode: outcome.error?.code ?? null,
        errorMessage: outcome.error?.message ?? null,
        errorLine: outcome.error?.line ?? null,
        errorField: outcome.error?.field ?? null,
        analysis: null,
      };
  const [written] = await Trace.update({ ...columns, analysisLeaseUntil: null }, { where: { id: trace.id, status: 'pending' } });
  return written === 1;
}

async function analyseOnce(ctx: AppContext, trace: Trace, signal: AbortSignal): Promise<void> {
  const run = await CableRun.findByPk(trace.cableRunId);
  const cable = run ? await CableType.findByPk(run.cableTypeId) : null;
  if (!cable) {
    await record(
      trace,
      failedOutcome(
        'NO_CABLE_TYPE',
        `The cable run of trace ${trace.id} has no cable type in the library, so the file could not be analysed.`,
      ),
      null,
    );
    return;
  }
  if (signal.aborted) throw new JobReleased();
  let copy;
  try {
    copy = await ctx.storage.checkout(trace.rawPath, trace.sha256);
  } catch (err) {
    // The stored file is gone or altered: trying again cannot help.
    if (err instanceof RawFileMissing || err instanceof RawFileChanged) {
      await record(
        trace,
        failedOutcome(err instanceof RawFileMissing ? 'RAW_FILE_MISSING' : 'RAW_FILE_CHANGED', err.message),
        cable,
      );
      return;
    }
    throw err;
  }
  const result = await analysisPool(ctx, 'background')
    .analyse({ path: copy.path, settings: trace.settings, cable: analysisCable(cable), maxBytes: ctx.config.maxUploadBytes })
    .finally(() => copy.release());
  const code = result.outcome.error?.code;
  if (code && TRY_AGAIN.has(code)) throw new Error(result.outcome.error!.message);
  if (await record(trace, result.outcome, cable)) {
    if (result.parsed) rememberParsed(ctx, trace.rawPath, trace.settings, result.parsed);
    ctx.log(
      `trace ${trace.id} analysed in the background: ${result.outcome.status}${code ? ` (${code})` : ''}, try ${trace.analysisAttempts}, ${Math.round(result.elapsedMs)} ms`,
    );
  }
}

/**
 * One try at a pending trace. A file the engine cannot read ends 'failed'
 * with the engine's reason (what and where: line, field) at once; trouble
 * that is not the file's (storage or database unreachable, server busy) is
 * tried again with back-off, and after ANALYSIS_MAX_TRIES the trace ends
 * 'failed' saying what the last try ran into.
 */
export async function analysePending(ctx: AppContext, traceId: number, signal: AbortSignal): Promise<void> {
  const trace = await claim(ctx, traceId);
  if (!trace) return;
  const tries = trace.analysisAttempts;
  const giveUp = (why: string) =>
    record(
      trace,
      failedOutcome(
        'ANALYSIS_GAVE_UP',
        `The background analysis of this file did not finish after ${ANALYSIS_MAX_TRIES} tries (the last: ${why}). The file is kept; analyse it again later.`,
      ),
      null,
    );
  if (tries > ANALYSIS_MAX_TRIES) {
    await giveUp(trace.errorMessage ?? 'its server stopped while analysing it');
    return;
  }
  try {
    await analyseOnce(ctx, trace, signal);
  } catch (err) {
    if (err instanceof JobReleased) {
      // This instance is stopping: hand the trace back without counting the try.
      await Trace.update(
        { analysisLeaseUntil: null, analysisAttempts: literal('analysis_attempts - 1') },
        { where: { id: traceId, status: 'pending' } },
      );
      throw err;
    }
    const why = ((err as Error)?.message || String(err)).slice(0, 200);
    if (tries >= ANALYSIS_MAX_TRIES) {
      await giveUp(why);
      return;
    }
    // Kept on the pending row (shown nowhere as a failure) so the last try's reason survives into the final one.
    await Trace.update({ analysisLeaseUntil: null, errorMessage: why }, { where: { id: traceId, status: 'pending' } });
    ctx.log(`the background analysis of trace ${traceId} failed (try ${tries} of ${ANALYSIS_MAX_TRIES}); it is tried again`, why);
    throw err;
  }
}

/**
 * Queue again the pending traces nobody holds that have not changed for
 * `idleMs`: their job was lost (the queue in memory ended with its process,
 * or an instance died between storing the upload and queueing its analysis).
 * A trace queued twice is still analysed once (the claim's lease).
 */
export async function requeueWaiting(ctx: AppContext, idleMs: number): Promise<number[]> {
  const now = Date.now();
  const waiting = await Trace.findAll({
    where: {
      status: 'pending',
      updatedAt: { [Op.lte]: new Date(now - idleMs) },
      [Op.or]: [{ analysisLeaseUntil: null }, { analysisLeaseUntil: { [Op.lte]: new Date(now) } }],
    },
    attributes: ['id'],
  });
  if (waiting.length)
    ctx.log(`${waiting.length} uploaded trace${waiting.length === 1 ? '' : 's'} waiting for analysis queued again`);
  const ids = waiting.map((t) => t.id);
  await queueAnalyses(ctx, ids);
  return ids;
}

/**
 * Declare the job on this instance's queue and queue again every pending
 * trace nobody holds (on SQLite the leases of the last process are void).
 * On PostgreSQL each instance also looks every lease period for a pending
 * trace left idle for two leases: longer than any retry's back-off, so a
 * trace whose job was lost, not one waiting for its retry (under a backlog
 * longer than that, a trace still waiting may be queued twice: it is still
 * analysed once).
 */
export async function registerTraceAnalysis(ctx: AppContext) {
  await ctx.jobs.define<AnalysisJob>(
    TRACE_ANALYSIS_JOB,
    { retryLimit: ANALYSIS_MAX_TRIES, retryDelaySeconds: 5, leaseSeconds: ctx.config.jobs.leaseSeconds },
    (data, job) => analysePending(ctx, data.traceId, job.signal),
  );
  if (ctx.jobs.engine === 'in-process') await Trace.update({ analysisLeaseUntil: null }, { where: { status: 'pending' } });
  await requeueWaiting(ctx, 0);
  if (ctx.jobs.engine !== 'pg-boss') return;
  const leaseMs = ctx.config.jobs.leaseSeconds * 1000;
  const timer = setInterval(() => {
    requeueWaiting(ctx, 2 * leaseMs).catch((err: Error) =>
      ctx.log('looking for uploads waiting for analysis failed', err.message),
    );
  }, leaseMs);
  timer.unref();
  ctx.onClose.unshift(async () => clearInterval(timer));
}
