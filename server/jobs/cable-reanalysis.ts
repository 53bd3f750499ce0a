import { Op, UniqueConstraintError, type InferCreationAttributes, type Transaction } from 'sequelize';
import type { CableReanalysisView } from '../../shared/schemas/cable-reanalysis';
import type { TraceAnalysis } from '../../shared/schemas/trace-analysis';
import type { AppContext } from '../context';
import { CableReanalysis, CableReanalysisItem, CableRun, CableType, Finding, Trace, User } from '../db/models';
import { AppError } from '../errors';
import { RawFileChanged, RawFileMissing } from '../storage';
import { analysisPool } from '../traces/analysis-pool';
import { analysisCable, reanalysisColumns } from '../traces/traces.service';
import { JobReleased } from './queue';

export const CABLE_REANALYSIS_JOB = 'cable-reanalysis';

/** Traces per job: small steps, so a step lost with its instance is redone quickly, and several instances share a long run. */
export const TRACES_PER_STEP = 20;

/** A finding counts as moved when the new analysis places it at least this far (metres) from where it was. */
export const MOVED_THRESHOLD_M = 0.05;

type ItemFields = Omit<
  InferCreationAttributes<CableReanalysisItem>,
  'id' | 'reanalysisId' | 'traceId' | 'resultTraceId' | 'createdAt'
>;

interface StepData {
  reanalysisId: number;
  traceIds: number[];
}

/**
 * The traces a re-analysis of this cable type covers: on runs of this type,
 * not archived, read by the engine, the newest analysis of their bytes (not
 * one a later re-analysis has replaced), and not already analysed with the
 * library's current revision.
 */
async function currentTraces(cable: CableType): Promise<number[]> {
  const runs = await CableRun.findAll({ where: { cableTypeId: cable.id }, attributes: ['id'] });
  if (!runs.length) return [];
  const traces = await Trace.findAll({
    where: {
      cableRunId: runs.map((r) => r.id),
      archivedAt: null,
      status: 'ok',
      // Analysed with another revision, or as another cable type (the run was given this one since).
      [Op.or]: [
        { cableTypeRevision: null },
        { cableTypeRevision: { [Op.ne]: cable.revision } },
        { cableTypeId: null },
        { cableTypeId: { [Op.ne]: cable.id } },
      ],
    },
    attributes: ['id'],
    order: [['id', 'ASC']],
  });
  if (!traces.length) return [];
  const replaced = new Set(
    (await Trace.findAll({ where: { reanalysisOfId: traces.map((t) => t.id) }, attributes: ['reanalysisOfId'] })).map(
      (t) => t.reanalysisOfId,
    ),
  );
  return traces.map((t) => t.id).filter((id) => !replaced.has(id));
}

async function sendSteps(ctx: AppContext, run: CableReanalysis, traceIds: number[]) {
  for (let i = 0; i < traceIds.length; i += TRACES_PER_STEP) {
    await ctx.jobs.send<StepData>(CABLE_REANALYSIS_JOB, {
      reanalysisId: run.id,
      traceIds: traceIds.slice(i, i + TRACES_PER_STEP),
    });
  }
}

/** Start a re-analysis of every current trace of a cable type; 409 while one for the same type is still running. */
export async function startCableReanalysis(ctx: AppContext, cableTypeId: number, userId: number): Promise<CableReanalysisView> {
  const cable = await CableType.findByPk(cableTypeId);
  if (!cable) throw AppError.notFound(`Cable type ${cableTypeId}`);
  const run = await ctx.sequelize.transaction(async (transaction) => {
    if (ctx.sequelize.getDialect() === 'postgres') {
      // Two planners pressing the button on two instances at once start one run.
      await ctx.sequelize.query('SELECT pg_advisory_xact_lock(:a, :b)', {
        replacements: { a: 7_460_302, b: cable.id },
        transaction,
      });
    }
    const running = await CableReanalysis.findOne({ where: { cableTypeId, status: 'running' }, transaction });
    if (running) {
      throw new AppError(
        409,
        'reanalysis_running',
        `A re-analysis of ${cable.name} is already running (started ${running.createdAt.toISOString().slice(0, 16).replace('T', ' ')} UTC); wait for it to finish.`,
        {
          reanalysisId: running.id,
        },
      );
    }
    const traceIds = await currentTraces(cable);
    return CableReanalysis.create(
      {
        cableTypeId,
        cableTypeRevision: cable.revision,
        vf: cable.vf,
        requestedById: userId,
        status: traceIds.length ? 'running' : 'done',
        traceTotal: traceIds.length,
        traceIds,
        finishedAt: traceIds.length ? null : new Date(),
      },
      { transaction },
    );
  });
  ctx.log(`re-analysis ${run.id} of cable type ${cable.id} started: ${run.traceTotal} traces`);
  await sendSteps(ctx, run, run.traceIds);
  return reanalysisView(run.id);
}

/** Where the new analysis places each finding of the earlier trace: matched by round-trip time, which the VF does not change. */
export function findingShifts(findings: Array<Pick<Finding, 'roundTripNs' | 'distanceM'>>, analysis: TraceAnalysis | null) {
  let moved = 0;
  let unmatched = 0;
  let maxShiftM: number | null = null;
  let sumShiftM = 0;
  for (const f of findings) {
    const tolNs = Math.max(5, 0.02 * Math.abs(f.roundTripNs));
    let best: { distanceM: number; dt: number } | null = null;
    for (const e of analysis?.events ?? []) {
      const dt = Math.abs(e.roundTripNs - f.roundTripNs);
      if (dt <= tolNs && (!best || dt < best.dt)) best = { distanceM: e.distanceM, dt };
    }
    if (!best) {
      unmatched += 1;
      continue;
    }
    const shift = Math.abs(best.distanceM - f.distanceM);
    sumShiftM += shift;
    maxShiftM = Math.max(maxShiftM ?? 0, shift);
    if (shift >= MOVED_THRESHOLD_M) moved += 1;
  }
  return { findings: findings.length, findingsMoved: moved, findingsUnmatched: unmatched, maxShiftM, sumShiftM };
}

/** Analyse one trace again into a new trace row and record it, once: the item's unique index refuses a second result. */
async function reanalyseOne(ctx: AppContext, run: CableReanalysis, cable: CableType, traceId: number) {
  const earlier = await Trace.findByPk(traceId);
  const none = { findings: 0, findingsMoved: 0, findingsUnmatched: 0, maxShiftM: null, sumShiftM: 0 };
  const archived = { ...none, outcome: 'skipped' as const, note: 'the trace was archived as junk; it is not analysed again' };
  const record = async (fields: ItemFields, makeTrace?: (transaction: Transaction) => Promise<Trace>) => {
    try {
      await ctx.sequelize.transaction(async (transaction) => {
        let item = fields;
        let made: Trace | null = null;
        if (makeTrace) {
          // Archived while it was in the worker: a new row would bring the junk back into the lists. The row is
          // held (FOR UPDATE on PostgreSQL) as archiveTrace holds it, so an archive at the same moment comes first or after.
          const now = await Trace.findByPk(traceId, { attributes: ['id', 'archivedAt'], lock: transaction.LOCK.UPDATE, transaction });
          if (!now || now.archivedAt) item = archived;
          else made = await makeTrace(transaction);
        }
        await CableReanalysisItem.create({ ...item, resultTraceId: made?.id ?? null, reanalysisId: run.id, traceId }, { transaction });
      });
    } catch (err) {
      // Another instance recorded this trace first (its step was handed out again while it was still running): keep theirs.
      if (!(err instanceof UniqueConstraintError)) throw err;
    }
  };
  if (!earlier) return record({ ...none, outcome: 'skipped', note: 'the trace no longer exists' });
  if (earlier.archivedAt) return record(archived);
  let copy;
  try {
    copy = await ctx.storage.checkout(earlier.rawPath, earlier.sha256);
  } catch (err) {
    if (err instanceof RawFileMissing || err instanceof RawFileChanged)
      return record({ ...none, outcome: 'skipped', note: err.message.slice(0, 300) });
    throw err;
  }
  const { vfOverride: _dropped, ...settings } = earlier.settings;
  const result = await analysisPool(ctx, 'background')
    .analyse({ path: copy.path, settings, cable: analysisCable(cable), maxBytes: ctx.config.maxUploadBytes })
    .finally(() => copy.release());
  const findings = await Finding.findAll({ where: { traceId }, attributes: ['roundTripNs', 'distanceM'] });
  await record(
    {
      ...findingShifts(findings, result.outcome.analysis),
      outcome: result.outcome.status,
      note: result.outcome.error?.message ?? null,
    },
    (transaction) =>
      Trace.create(reanalysisColumns(earlier, result.outcome, cable, settings, run.requestedById), { transaction }),
  );
}

/** Mark the run done once every one of its traces has an item (whichever instance gets there). */
async function finishIfComplete(run: CableReanalysis) {
  const done = await CableReanalysisItem.count({ where: { reanalysisId: run.id } });
  if (done >= run.traceTotal)
    await CableReanalysis.update({ status: 'done', finishedAt: new Date() }, { where: { id: run.id, status: 'running' } });
}

async function runStep(ctx: AppContext, data: StepData, signal: AbortSignal) {
  const run = await CableReanalysis.findByPk(data.reanalysisId);
  if (!run || run.status !== 'running') return;
  const cable = await CableType.findByPk(run.cableTypeId);
  if (!cable) return;
  const done = new Set(
    (await CableReanalysisItem.findAll({ where: { reanalysisId: run.id, traceId: data.traceIds }, attributes: ['traceId'] })).map(
      (i) => i.traceId,
    ),
  );
  // The library's values of now, where they are not those the run started with (a planner changed the type while
  // its steps waited), would make a run reported as one VF analyse some traces with another: the rest are skipped,
  // saying so, and stay at their old revision for the next run to take.
  const changed =
    cable.revision !== run.cableTypeRevision
      ? `the cable type was changed (revision ${cable.revision}, VF ${cable.vf}) after this re-analysis started with revision ${run.cableTypeRevision} (VF ${run.vf}): start a new re-analysis`
      : null;
  for (const traceId of data.traceIds) {
    if (done.has(traceId)) continue;
    if (signal.aborted) throw new JobReleased();
    if (changed) await skipOne(ctx, run, traceId, changed.slice(0, 300));
    else await reanalyseOne(ctx, run, cable, traceId);
  }
  await finishIfComplete(run);
}

/** Record a trace of the run as skipped, once (the item's unique index refuses a second). */
async function skipOne(ctx: AppContext, run: CableReanalysis, traceId: number, note: string) {
  try {
    await ctx.sequelize.transaction((transaction) =>
      CableReanalysisItem.create(
        { reanalysisId: run.id, traceId, resultTraceId: null, outcome: 'skipped', note, findings: 0, findingsMoved: 0, findingsUnmatched: 0, maxShiftM: null, sumShiftM: 0 },
        { transaction },
      ),
    );
  } catch (err) {
    if (!(err instanceof UniqueConstraintError)) throw err;
  }
}

/**
 * Declare the job on this instance's queue, and queue again the traces of a running re-analysis that no job holds:
 * on SQLite every one a restart interrupted (the jobs were in memory); on PostgreSQL those of a run whose instance
 * was killed after the run was stored but before its steps were queued, or whose steps used up their retries. A
 * trace a live job still holds is left to it; one queued twice is analysed once (the item's unique index).
 */
export async function registerCableReanalysis(ctx: AppContext) {
  await ctx.jobs.define<StepData>(
    CABLE_REANALYSIS_JOB,
    { retryLimit: 5, retryDelaySeconds: 5, leaseSeconds: ctx.config.jobs.leaseSeconds },
    (data, job) => runStep(ctx, data, job.signal),
  );
  const running = await CableReanalysis.findAll({ where: { status: 'running' } });
  if (!running.length) return;
  const held = new Set((await ctx.jobs.unfinished<StepData>(CABLE_REANALYSIS_JOB)).flatMap((j) => (j.traceIds ?? []).map((id) => `${j.reanalysisId}:${id}`)));
  for (const run of running) {
    const done = new Set(
      (await CableReanalysisItem.findAll({ where: { reanalysisId: run.id }, attributes: ['traceId'] })).map((i) => i.traceId),
    );
    const left = run.traceIds.filter((id) => !done.has(id) && !held.has(`${run.id}:${id}`));
    if (left.length) {
      ctx.log(`re-analysis ${run.id} resumed: ${left.length} of ${run.traceTotal} traces queued again`);
      await sendSteps(ctx, run, left);
    } else if (run.traceIds.every((id) => done.has(id))) await finishIfComplete(run);
  }
}

export async function reanalysisView(id: number): Promise<CableReanalysisView> {
  const run = await CableReanalysis.findByPk(id);
  if (!run) throw AppError.notFound(`Re-analysis ${id}`);
  const items = await CableReanalysisItem.findAll({ where: { reanalysisId: id } });
  const by = await User.findByPk(run.requestedById, { attributes: ['id', 'name'] });
  const count = (o: string) => items.filter((i) => i.outcome === o).length;
  const findings = items.reduce((n, i) => n + i.findings, 0);
  const unmatched = items.reduce((n, i) => n + i.findingsUnmatched, 0);
  const matched = findings - unmatched;
  const sum = items.reduce((n, i) => n + i.sumShiftM, 0);
  const maxes = items.map((i) => i.maxShiftM).filter((m): m is number => m !== null);
  return {
    id: run.id,
    cableTypeId: run.cableTypeId,
    cableTypeRevision: run.cableTypeRevision,
    vf: run.vf,
    status: run.status,
    requestedBy: { id: run.requestedById, name: by?.name ?? `user ${run.requestedById}` },
    startedAt: run.createdAt.toISOString(),
    finishedAt: run.finishedAt ? run.finishedAt.toISOString() : null,
    traceTotal: run.traceTotal,
    tracesDone: items.length,
    tracesOk: count('ok'),
    tracesFailed: count('failed'),
    tracesSkipped: count('skipped'),
    findings,
    findingsMoved: items.reduce((n, i) => n + i.findingsMoved, 0),
    findingsUnmatched: unmatched,
    movedThresholdM: MOVED_THRESHOLD_M,
    // Folded, not spread into Math.max: a cable type of some hundred thousand traces would overflow the call stack.
    maxShiftM: maxes.length ? maxes.reduce((a, b) => Math.max(a, b)) : null,
    meanShiftM: matched > 0 ? sum / matched : null,
    skipped: items
      .filter((i) => i.outcome === 'skipped')
      .slice(0, 20)
      .map((i) => ({ traceId: i.traceId, note: i.note ?? '' })),
  };
}

/** The newest re-analysis of a cable type, or null. */
export async function latestReanalysis(cableTypeId: number): Promise<CableReanalysisView | null> {
  if (!(await CableType.findByPk(cableTypeId, { attributes: ['id'] }))) throw AppError.notFound(`Cable type ${cableTypeId}`);
  const run = await CableReanalysis.findOne({ where: { cableTypeId }, order: [['id', 'DESC']] });
  return run ? reanalysisView(run.id) : null;
}
