import { createHash } from 'node:crypto';
import { createReadStream } from 'node:fs';
import fs from 'node:fs/promises';
import path from 'node:path';
import { literal, Op, UniqueConstraintError, type Sequelize, type Transaction, type WhereOptions } from 'sequelize';
import type { z } from 'zod';
import { matchEvents, resampleOnto } from '../../shared/field/compare';
import type { TraceAnalysis } from '../../shared/schemas/trace-analysis';
import type {
  CableEnd,
  DuplicateFile,
  TraceComparison,
  TraceDetail,
  TraceListQuerySchema,
  TraceSettings,
  TraceSummary,
  TraceUploadSchema,
} from '../../shared/schemas/traces';
import type { Page } from '../../shared/schemas/users';
import { decimateMinMax, ENGINE_VERSION, type ParsedTrace } from '../../shared/trace';
import { can, type Role } from '../../shared/auth/permissions';
import type { AppContext } from '../context';
import { CableRun, CableType, Finding, RouteMarker, Site, Trace, UploadReceipt, User } from '../db/models';
import { markerView } from '../cable-runs/cable-runs.service';
import { AppError } from '../errors';
import { boundedAnalysis, parseOptions, type AnalysisCable, type Outcome } from './analysis';
import { analysisPool } from './analysis-pool';
import { inboxDir, releaseInbox, sweepInbox, sweepOrphans, writeInbox } from './trace-store';
import { idsContaining } from '../db/text-search';

export type UploadFields = z.output<typeof TraceUploadSchema>;

/** One file of an upload: waiting in the inbox (`path`, as multer wrote it) or in memory (`bytes`, the demo seed). */
export type IncomingFile = { originalName: string } & ({ path: string } | { bytes: Buffer });

/** Same bytes on the same run and end within this long of the first upload: a duplicate, not stored again. */
export const DUPLICATE_WINDOW_MS = 24 * 60 * 60 * 1000;

/** The columns that record one analysis: its outcome and the cable values and engine it was made with. */
export function analysisColumns(outcome: Outcome, cable: CableType, settings: TraceSettings) {
  return {
    status: outcome.status,
    errorCode: outcome.error?.code ?? null,
    errorMessage: outcome.error?.message ?? null,
    errorLine: outcome.error?.line ?? null,
    errorField: outcome.error?.field ?? null,
    settings,
    vf: settings.vfOverride ?? cable.vf,
    vfTolerance: cable.vfTolerance,
    z0Ohm: cable.z0Ohm,
    cableTypeId: cable.id,
    cableTypeRevision: cable.revision,
    engineVersion: ENGINE_VERSION,
    analysis: outcome.analysis,
  };
}

/** A new analysis of a stored trace: the same file on the same run and end, analysed again by `analysedById`. */
export function reanalysisColumns(
  earlier: Trace,
  outcome: Outcome,
  cable: CableType,
  settings: TraceSettings,
  analysedById: number,
) {
  return {
    cableRunId: earlier.cableRunId,
    end: earlier.end,
    uploadedById: analysedById,
    originalName: earlier.originalName,
    rawPath: earlier.rawPath,
    sha256: earlier.sha256,
    sizeBytes: earlier.sizeBytes,
    ...analysisColumns(outcome, cable, settings),
    vfOverrideReason: null,
    reanalysisOfId: earlier.id,
  };
}

/** The job that analyses a large upload in the background (server/traces/background-analysis.ts). */
export const TRACE_ANALYSIS_JOB = 'trace-analysis';

/** A large upload's row before its analysis: the settings and the cable values it is to be analysed with. */
export function pendingColumns(cable: CableType, settings: TraceSettings) {
  return {
    ...analysisColumns({ status: 'ok', analysis: null, error: null }, cable, settings),
    status: 'pending' as const,
  };
}

/** The cable type's values as the analysis worker takes them (plain data). */
export function analysisCable(cable: CableType): AnalysisCable {
  return cable.get({ plain: true }) as AnalysisCable;
}

function settingsFrom(fields: UploadFields): TraceSettings {
  const s: TraceSettings = { mode: fields.mode };
  if (fields.pulseWidthNs !== undefined) s.pulseWidthNs = fields.pulseWidthNs;
  if (fields.zeroOffsetNs !== undefined) s.zeroOffsetNs = fields.zeroOffsetNs;
  if (fields.leadLengthM !== undefined) s.leadLengthM = fields.leadLengthM;
  if (fields.sampleIntervalNs !== undefined) s.sampleIntervalNs = fields.sampleIntervalNs;
  if (fields.vfOverride !== undefined) s.vfOverride = fields.vfOverride;
  return s;
}

export interface UploadOutcome {
  /** The traces this upload stored, in file order. */
  traceIds: number[];
  duplicates: DuplicateFile[];
  /** Answered from an earlier upload with the same idempotency key. */
  replayed: boolean;
}

async function runAndCable(fields: Pick<UploadFields, 'cableRunId'>) {
  const run = await CableRun.findByPk(fields.cableRunId);
  if (!run) {
    throw new AppError(422, 'no_such_cable_run', `There is no cable run ${fields.cableRunId}.`, {
      fields: [{ field: 'cableRunId', message: `there is no cable run ${fields.cableRunId}` }],
    });
  }
  const cable = await CableType.findByPk(run.cableTypeId);
  if (!cable) throw new AppError(422, 'no_cable_type', `Cable run ${run.name} has no cable type in the library.`);
  return { run, cable };
}

/** The SHA-256 of a file waiting in the inbox, read as a stream. */
async function fileSha256(p: string): Promise<string> {
  const hash = createHash('sha256');
  for await (const chunk of createReadStream(p)) hash.update(chunk as Buffer);
  return hash.digest('hex');
}

/**
 * The earlier upload under this key, if any. It is a retry only when it went
 * to the same run and end with the same bytes (file names may differ); a key
 * reused for other files is refused, never answered with the first files' result.
 */
async function earlierReceipt(
  userId: number,
  key: string,
  fields: UploadFields,
  hashes: string[],
): Promise<UploadOutcome | null> {
  const receipt = await UploadReceipt.findOne({ where: { userId, idempotencyKey: key } });
  if (!receipt) return null;
  if (receipt.cableRunId !== fields.cableRunId || receipt.end !== fields.end) {
    throw new AppError(
      422,
      'idempotency_key_reused',
      'This Idempotency-Key was already used for an upload to another cable run or end. Send a new key for a new upload.',
      {
        fields: [{ field: 'Idempotency-Key', message: 'already used for a different upload' }],
      },
    );
  }
  const ids = [...receipt.traceIds, ...receipt.duplicates.map((d) => d.traceId)];
  const rows = await Trace.findAll({ where: { id: ids }, attributes: ['id', 'sha256'] });
  const shaOf = new Map(rows.map((t) => [t.id, t.sha256]));
  const before = ids.map((id) => shaOf.get(id) ?? '').sort();
  const now = [...hashes].sort();
  if (before.length !== now.length || before.some((h, i) => h !== now[i])) {
    throw new AppError(
      422,
      'idempotency_key_reused',
      'This Idempotency-Key was already used for an upload of different files: a retry must send the same files. Nothing was stored; send a new key for a new upload.',
      { fields: [{ field: 'Idempotency-Key', message: 'already used for different files' }] },
    );
  }
  return { traceIds: receipt.traceIds, duplicates: receipt.duplicates, replayed: true };
}

/**
 * The first trace holding these bytes on this run and end, uploaded within the
 * duplicate window. An archived trace does not count: it was set aside (a bad
 * shot, the wrong run), so the same file uploaded again is stored as new.
 */
async function earlierCopy(sha256: string, cableRunId: number, end: CableEnd, transaction?: Transaction) {
  return Trace.findOne({
    where: {
      sha256,
      cableRunId,
      end,
      reanalysisOfId: null,
      archivedAt: null,
      createdAt: { [Op.gte]: new Date(Date.now() - DUPLICATE_WINDOW_MS) },
    },
    order: [['id', 'ASC']],
    attributes: ['id', 'createdAt'],
    transaction,
  });
}

const duplicateOf = (originalName: string, t: Pick<Trace, 'id' | 'createdAt'>): DuplicateFile => ({
  originalName,
  traceId: t.id,
  uploadedAt: t.createdAt.toISOString(),
});

/**
 * Receive the files of one upload. Each is analysed once, in the worker pool,
 * off the request thread and outside any transaction; files already uploaded
 * (same SHA-256, same run and end, within a day) are reported, not stored
 * again; the rest are moved into the store and their rows written in one
 * short transaction with the upload's receipt. Either every new file of the
 * upload is recorded (readable or marked failed) or none is, and no stray
 * file is left: the inbox copies go whatever happens, and a file moved into
 * the store is removed again if its row is not written.
 *
 * With an idempotency key, a second upload under the same key (a retry whose
 * answer was lost) is answered with the first one's outcome.
 */
export async function receiveUpload(
  ctx: AppContext,
  fields: UploadFields,
  files: IncomingFile[],
  uploadedById: number,
  idempotencyKey?: string,
): Promise<UploadOutcome> {
  const inbox: string[] = [];
  const adopted: string[] = [];
  let committed = false;
  let hashes: string[] = [];
  try {
    for (const f of files) inbox.push('path' in f ? f.path : await writeInbox(ctx.config.uploadDir, f.bytes));
    if (idempotencyKey) {
      hashes = await Promise.all(inbox.map(fileSha256));
      const earlier = await earlierReceipt(uploadedById, idempotencyKey, fields, hashes);
      if (earlier) return earlier;
    }
    const { run, cable } = await runAndCable(fields);
    const settings = settingsFrom(fields);
    const pool = analysisPool(ctx);
    // Each file is known by its bytes before anything else: a copy of a trace stored earlier, or a repeat of a file
    // earlier in this upload, is reported as such and never analysed.
    if (hashes.length !== inbox.length) hashes = await Promise.all(inbox.map(fileSha256));
    const plan: Array<{ kind: 'new' } | { kind: 'copy'; of: DuplicateFile } | { kind: 'repeat'; of: number }> = [];
    for (const [index, sha256] of hashes.entries()) {
      const first = hashes.indexOf(sha256);
      if (first < index) {
        plan.push({ kind: 'repeat', of: first });
        continue;
      }
      const earlier = await earlierCopy(sha256, run.id, fields.end);
      plan.push(earlier ? { kind: 'copy', of: duplicateOf(files[index].originalName, earlier) } : { kind: 'new' });
    }

    // The new files only: a small one is analysed now; a large one is stored as pending and analysed by a background job.
    const sizes = await Promise.all(inbox.map(async (p, i) => (plan[i].kind === 'new' ? (await fs.stat(p)).size : 0)));
    const largeCount = sizes.filter((size) => size > ctx.config.analysisInlineMaxBytes).length;
    // Refused before any analysis is spent on the upload's small files; counted again inside the transaction.
    if (largeCount) await refuseTooManyPending(ctx, uploadedById, largeCount);
    const results: Array<{ sha256: string; sizeBytes: number; outcome: Outcome | null; parsed: ParsedTrace | null } | null> = await Promise.all(
      inbox.map(async (p, i) => {
        if (plan[i].kind !== 'new') return null;
        const sizeBytes = sizes[i];
        if (sizeBytes > ctx.config.analysisInlineMaxBytes) return { sha256: hashes[i], sizeBytes, outcome: null, parsed: null };
        const analysed = await pool.analyse({ path: p, settings, cable: analysisCable(cable), maxBytes: ctx.config.maxUploadBytes }, { owner: `user ${uploadedById}` });
        return { ...analysed, sha256: hashes[i] };
      }),
    );
    const rawPaths = new Map<number, string>();
    for (const [index, step] of plan.entries()) {
      if (step.kind !== 'new') continue;
      const rawPath = await ctx.storage.adopt(inbox[index]);
      adopted.push(rawPath);
      rawPaths.set(index, rawPath);
    }

    const outcome = await ctx.sequelize.transaction(async (transaction) => {
      if (ctx.sequelize.getDialect() === 'postgres') {
        // One upload at a time per run, so two uploads of the same bytes cannot both pass the duplicate check.
        await ctx.sequelize.query('SELECT pg_advisory_xact_lock(:key)', { replacements: { key: run.id }, transaction });
      }
      const traceIds: number[] = [];
      const pendingMade: number[] = [];
      const duplicates: DuplicateFile[] = [];
      const recordedAs = new Map<number, Pick<Trace, 'id' | 'createdAt'>>();
      const storedPaths = new Set<string>();
      for (const [index, step] of plan.entries()) {
        const r = results[index]!;
        const name = files[index].originalName;
        if (step.kind === 'repeat') {
          duplicates.push(duplicateOf(name, recordedAs.get(step.of)!));
          continue;
        }
        // Checked again inside the transaction: another upload of the same bytes may have committed since.
        const earlier = step.kind === 'copy' ? null : await earlierCopy(r.sha256, run.id, fields.end, transaction);
        if (step.kind === 'copy' || earlier) {
          const of = step.kind === 'copy' ? step.of : duplicateOf(name, earlier!);
          recordedAs.set(index, { id: of.traceId, createdAt: new Date(of.uploadedAt) });
          duplicates.push(of);
          continue;
        }
        const trace = await Trace.create(
          {
            cableRunId: run.id,
            end: fields.end,
            uploadedById,
            originalName: name.slice(0, 255),
            rawPath: rawPaths.get(index)!,
            sha256: r.sha256,
            sizeBytes: r.sizeBytes,
            ...(r.outcome ? analysisColumns(r.outcome, cable, settings) : pendingColumns(cable, settings)),
            vfOverrideReason: fields.vfOverrideReason ?? null,
            deviceAnalysis: fields.deviceAnalysis ?? null,
          },
          { transaction },
        );
        recordedAs.set(index, trace);
        traceIds.push(trace.id);
        if (!r.outcome) pendingMade.push(trace.id);
        storedPaths.add(rawPaths.get(index)!);
      }
      if (pendingMade.length) {
        if (ctx.sequelize.getDialect() === 'postgres') {
          // One person's uploads count their waiting files one after the other (SQLite writes one at a time).
          await ctx.sequelize.query('SELECT pg_advisory_xact_lock(:space, :userId)', { replacements: { space: PENDING_LOCK_SPACE, userId: uploadedById }, transaction });
        }
        await refuseTooManyPending(ctx, uploadedById, pendingMade.length, transaction, pendingMade);
      }
      if (idempotencyKey) {
        await UploadReceipt.create(
          { userId: uploadedById, idempotencyKey, cableRunId: run.id, end: fields.end, traceIds, duplicates },
          { transaction },
        );
      }
      return { traceIds, duplicates, replayed: false, storedPaths };
    });
    committed = true;

    // A file that turned out to be a copy inside the transaction is not kept (no committed row names it); the others' samples are, to draw them.
    for (const [index, rawPath] of rawPaths) {
      if (!outcome.storedPaths.has(rawPath)) await ctx.storage.remove(rawPath).catch(() => undefined);
      else if (results[index]?.parsed) rememberParsed(ctx, rawPath, settings, results[index]!.parsed!);
    }
    // Only a large file is left pending (analysed by a background job); an upload of small files has nothing to queue.
    if (results.some((r) => r !== null && r.outcome === null)) await queueAnalyses(ctx, outcome.traceIds);
    return { traceIds: outcome.traceIds, duplicates: outcome.duplicates, replayed: false };
  } catch (err) {
    if (!committed) for (const rel of adopted) await ctx.storage.remove(rel).catch(() => undefined);
    if (idempotencyKey && err instanceof UniqueConstraintError) {
      // The same key committed first from another request: answer with its outcome.
      const earlier = await earlierReceipt(uploadedById, idempotencyKey, fields, hashes);
      if (earlier) return earlier;
    }
    throw err;
  } finally {
    await Promise.all(inbox.map((p) => fs.rm(p, { force: true })));
    releaseInbox(...inbox);
  }
}

/** The advisory lock space (first key) that holds one person's uploads while their waiting files are counted. */
const PENDING_LOCK_SPACE = 7_301;

/**
 * The background analysis has one thread for everyone: a person may have at most ANALYSIS_PENDING_PER_USER large
 * files waiting for it, so one account's upload of hundreds cannot hold everyone else's for hours. An upload whose
 * large files would pass that is refused whole (429, nothing stored); its small files are analysed at once as
 * ever, so it may be sent again without the large ones. `made`: traces this upload has just created (not counted
 * as waiting before it).
 */
async function refuseTooManyPending(ctx: AppContext, userId: number, adding: number, transaction?: Transaction, made: number[] = []) {
  const cap = ctx.config.analysisPendingPerUser;
  const waiting = await Trace.count({ where: { uploadedById: userId, status: 'pending', ...(made.length ? { id: { [Op.notIn]: made } } : {}) }, transaction });
  if (waiting + adding <= cap) return;
  const files = (n: number) => `${n} large file${n === 1 ? '' : 's'}`;
  throw new AppError(
    429,
    'too_many_waiting',
    `You have ${files(waiting)} waiting for analysis; each person may have at most ${cap} waiting, so everyone's keep moving. ` +
      `This upload's ${files(adding)} would make ${waiting + adding}, so nothing was stored: send ${adding === 1 ? 'it' : 'them'} again once some of yours are analysed, or send fewer at a time.`,
    {
      fields: [{ field: 'file', message: `${files(adding)} over the limit of ${cap} waiting for analysis per person (${waiting} waiting now)` }],
      limit: cap,
      waiting,
    },
  );
}

/** 409 for anything that needs the analysis of a trace still waiting for it. */
export function pendingConflict(id: number, what: string) {
  return new AppError(
    409,
    'trace_pending',
    `Trace ${id} is still being analysed; it can be ${what} once its analysis has finished (the trace page shows when).`,
    {
      fields: [{ field: 'traceId', message: 'the trace is still being analysed' }],
    },
  );
}

/**
 * Queue the background analysis of those of these traces still pending. Sent
 * after commit; if the queue cannot take it now, the start-up of the next
 * instance queues every pending trace again, so none is left pending.
 */
export async function queueAnalyses(ctx: AppContext, traceIds: number[]) {
  if (!traceIds.length) return;
  const pending = await Trace.findAll({ where: { id: traceIds, status: 'pending' }, attributes: ['id'], order: [['id', 'ASC']] });
  for (const t of pending) {
    try {
      await ctx.jobs.send(TRACE_ANALYSIS_JOB, { traceId: t.id });
    } catch (err) {
      ctx.log(
        `the analysis of trace ${t.id} could not be queued now; it is queued again at the next start`,
        (err as Error).message,
      );
    }
  }
}

/** For the demo seed: store files and return, per file, the trace it is recorded as (new or the earlier copy). */
export async function storeTraces(
  ctx: AppContext,
  fields: UploadFields,
  files: IncomingFile[],
  uploadedById: number,
): Promise<number[]> {
  const result = await receiveUpload(ctx, fields, files, uploadedById);
  const stored = await Trace.findAll({ where: { id: result.traceIds }, order: [['id', 'ASC']] });
  return files.map(
    (f) =>
      stored.find((t) => t.originalName === f.originalName.slice(0, 255))?.id ??
      result.duplicates.find((d) => d.originalName === f.originalName)!.traceId,
  );
}

/**
 * Analyse a stored trace again with the cable library's current VF, tolerance
 * and Z0 (and the current engine). The earlier trace and its findings stay as
 * they were — they are the record of what was read on the day — and the new
 * analysis is a new trace row over the same stored bytes, pointing back.
 * A VF override of the earlier upload is dropped: the point is the library value.
 */
/** Re-analyses under way, by earlier trace and library revision: a second request waits for the first. */
const reanalysesInFlight = new Map<string, Promise<{ id: number; created: boolean }>>();

/**
 * Analyse a stored trace again with the library's current values. The new row
 * stays the evidence of whoever uploaded the file (deciding its events stays
 * theirs or a supervisor's), and only they or a supervisor may ask for it. An
 * archived trace is restored first. Asking again while nothing changed (same
 * library revision and engine) returns the re-analysis already made.
 */
export async function reanalyseTrace(
  ctx: AppContext,
  id: number,
  user: { id: number; role: Role },
): Promise<{ id: number; created: boolean }> {
  const earlier = await Trace.findByPk(id);
  if (!earlier) throw AppError.notFound(`Trace ${id}`);
  if (earlier.uploadedById !== user.id && !can(user.role, 'findings:review')) {
    throw new AppError(
      403,
      'not_your_trace',
      `Someone else uploaded trace ${id}: they or a supervisor may have it analysed again.`,
    );
  }
  if (earlier.archivedAt) {
    throw AppError.conflict(
      'trace_archived',
      `Trace ${id} is archived: an administrator restores it before it is analysed again.`,
    );
  }
  if (earlier.status === 'pending') throw pendingConflict(id, 'analysed again');
  const run = await CableRun.findByPk(earlier.cableRunId);
  const cable = run ? await CableType.findByPk(run.cableTypeId) : null;
  if (!run || !cable) throw new AppError(422, 'no_cable_type', `The cable run of trace ${id} has no cable type in the library.`);
  const key = `${earlier.id}:${cable.id}:${cable.revision}:${ENGINE_VERSION}`;
  const running = reanalysesInFlight.get(key);
  if (running) return { id: (await running).id, created: false };
  const job = reanalyseOnce(ctx, earlier, cable, user.id).finally(() => reanalysesInFlight.delete(key));
  reanalysesInFlight.set(key, job);
  return job;
}

async function reanalyseOnce(ctx: AppContext, earlier: Trace, cable: CableType, askedBy: number): Promise<{ id: number; created: boolean }> {
  const id = earlier.id;
  const { vfOverride: _dropped, ...settings } = earlier.settings;
  const done = await Trace.findOne({
    where: { reanalysisOfId: id, cableTypeId: cable.id, cableTypeRevision: cable.revision, engineVersion: ENGINE_VERSION, archivedAt: null },
    order: [['id', 'DESC']],
  });
  if (done && JSON.stringify(done.settings) === JSON.stringify(settings)) return { id: done.id, created: false };
  const copy = await ctx.storage.checkout(earlier.rawPath, earlier.sha256);
  const result = await analysisPool(ctx)
    .analyse({ path: copy.path, settings, cable: analysisCable(cable), maxBytes: ctx.config.maxUploadBytes }, { owner: `user ${askedBy}` })
    .finally(() => copy.release());
  if (result.sha256 !== earlier.sha256) {
    throw new AppError(
      409,
      'raw_file_changed',
      `The stored file of trace ${id} no longer matches its SHA-256; it will not be analysed again.`,
    );
  }
  if (result.parsed) rememberParsed(ctx, earlier.rawPath, settings, result.parsed);
  const trace = await ctx.sequelize.transaction(async (transaction) => {
    // Archived while it was in the worker: a new row would bring the junk back into the lists.
    const now = await Trace.findByPk(id, { attributes: ['id', 'archivedAt'], lock: transaction.LOCK.UPDATE, transaction });
    if (!now || now.archivedAt) {
      throw AppError.conflict(
        'trace_archived',
        `Trace ${id} was archived while it was being analysed again, so the new analysis was not stored. An administrator restores it before it is analysed again.`,
      );
    }
    return Trace.create(reanalysisColumns(earlier, result.outcome, cable, settings, earlier.uploadedById), { transaction });
  });
  return { id: trace.id, created: true };
}

/**
 * At start: remove stored files no trace row names, and uploads left in the
 * inbox (what a crash between writing a file and committing its row leaves).
 */
export async function sweepUploads(ctx: AppContext): Promise<number> {
  const rows = await Trace.findAll({ attributes: ['rawPath'], raw: true });
  const known = new Set(rows.map((r) => r.rawPath));
  // This instance's inbox (and, with the folder store, the stored files)…
  const removed = await sweepOrphans(
    ctx.config.uploadDir,
    ctx.storage.kind === 'folder' ? known : [],
    ctx.config.uploadSweepMinAgeMs,
    Date.now(),
    ctx.storage.kind === 'folder' ? undefined : [inboxDir(ctx.config.uploadDir), path.join(ctx.config.uploadDir, 'scratch')],
  );
  // …and, with object storage, the objects no trace names.
  if (ctx.storage.kind !== 'folder') {
    for (const o of await ctx.storage.list()) {
      if (known.has(o.key) || Date.now() - o.modifiedMs < ctx.config.uploadSweepMinAgeMs) continue;
      await ctx.storage.remove(o.key);
      removed.push(o.key);
    }
  }
  ctx.log(`Upload clean-up: removed ${removed.length} file${removed.length === 1 ? '' : 's'} no trace refers to.`);
  return removed.length;
}

/**
 * While running: the inbox files an upload cut off by a killed process left (a `.part` file of a form that never
 * ended), once they are `UPLOAD_SWEEP_MIN_AGE_S` old, so none waits for the next start. Every
 * `uploadSweepEveryMs`, on an unref'd timer; one sweep at a time.
 */
export function sweepInboxWhileRunning(ctx: AppContext): () => void {
  let running = false;
  const timer = setInterval(() => {
    if (running) return;
    running = true;
    sweepInbox(ctx.config.uploadDir, ctx.config.uploadSweepMinAgeMs)
      .then((removed) => {
        if (removed.length) ctx.logger.info({ removed }, `Upload clean-up: removed ${removed.length} unfinished upload${removed.length === 1 ? '' : 's'} from the inbox.`);
      })
      .catch((err: unknown) => ctx.logger.warn({ err }, 'Upload clean-up of the inbox failed; it is tried again.'))
      .finally(() => (running = false));
  }, ctx.config.uploadSweepEveryMs);
  timer.unref();
  return () => clearInterval(timer);
}

function endLabel(run: CableRun, end: CableEnd) {
  return end === 'A' ? run.endALabel : run.endBLabel;
}

/** A trace's cable run and the run's cable type. */
interface TraceRows {
  run: CableRun;
  cable: CableType | null;
}

/** Rows a caller has already read for these traces (their runs, their findings), so they are not read twice. */
interface SummaryRows {
  runs?: CableRun[];
  findings?: Array<Pick<Finding, 'id' | 'traceId'>>;
}

async function summaries(traces: Trace[], known: SummaryRows = {}): Promise<TraceSummary[]> {
  if (!traces.length) return [];
  // Independent reads side by side: one wait instead of one per query.
  const [runs, users, findings] = await Promise.all([
    known.runs ?? CableRun.findAll({ where: { id: [...new Set(traces.map((t) => t.cableRunId))] } }),
    User.findAll({ where: { id: [...new Set(traces.map((t) => t.uploadedById))] } }),
    known.findings ?? Finding.findAll({ where: { traceId: traces.map((t) => t.id) }, attributes: ['id', 'traceId'] }),
  ]);
  const sites = await Site.findAll({ where: { id: [...new Set(runs.map((r) => r.siteId))] } });
  return traces.map((t) => {
    const run = runs.find((r) => r.id === t.cableRunId)!;
    const site = sites.find((s) => s.id === run.siteId)!;
    const user = users.find((u) => u.id === t.uploadedById);
    return {
      id: t.id,
      cableRunId: t.cableRunId,
      cableRunName: run.name,
      siteId: site.id,
      siteName: site.name,
      end: t.end,
      endLabel: endLabel(run, t.end),
      originalName: t.originalName,
      sizeBytes: t.sizeBytes,
      sha256: t.sha256,
      status: t.status,
      errorMessage: t.errorMessage,
      uploadedBy: { id: t.uploadedById, name: user?.name ?? `user ${t.uploadedById}` },
      createdAt: t.createdAt.toISOString(),
      isReference: t.isReference,
      eventCount: Number(t.get('eventCount') ?? t.analysis?.events.length ?? 0),
      findingCount: findings.filter((f) => f.traceId === t.id).length,
    };
  });
}

/** The number of events in a trace's stored analysis, counted by the database (0 with no analysis). */
function eventCountSql() {
  return Trace.sequelize!.getDialect() === 'postgres'
    ? literal(`COALESCE(json_array_length("analysis"->'events'), 0)`)
    : literal(`COALESCE(json_array_length("analysis", '$.events'), 0)`);
}

export async function listTraces(q: z.output<typeof TraceListQuerySchema>): Promise<Page<TraceSummary>> {
  const where: WhereOptions<Trace> = {};
  // Archived traces are kept but left out of the lists.
  const and: WhereOptions<Trace>[] = [{ archivedAt: null }];
  if (q.cableRunId) and.push({ cableRunId: q.cableRunId });
  if (q.siteId) {
    const runs = await CableRun.findAll({ where: { siteId: q.siteId }, attributes: ['id'] });
    and.push({ cableRunId: runs.map((r) => r.id) });
  }
  if (q.end) and.push({ end: q.end });
  if (q.status) and.push({ status: q.status });
  if (q.uploadedById) and.push({ uploadedById: q.uploadedById });
  if (q.from) and.push({ createdAt: { [Op.gte]: new Date(`${q.from}T00:00:00Z`) } });
  if (q.to) and.push({ createdAt: { [Op.lt]: new Date(new Date(`${q.to}T00:00:00Z`).getTime() + 86_400_000) } });
  if (q.q) and.push(idsContaining(Trace, ['original_name'], q.q));
  if (and.length) Object.assign(where, { [Op.and]: and });
  const { rows, count } = await Trace.findAndCountAll({
    where,
    // A list row needs the number of events, not the analysis: the database counts them, so a page
    // never reads (or parses) analyses that can run to megabytes each.
    attributes: { exclude: ['analysis', 'deviceAnalysis'], include: [[eventCountSql(), 'eventCount']] },
    order: [
      [q.sort, q.dir.toUpperCase()],
      ['id', q.dir.toUpperCase()],
    ],
    limit: q.pageSize,
    offset: (q.page - 1) * q.pageSize,
  });
  return { items: await summaries(rows), total: count, page: q.page, pageSize: q.pageSize };
}

/**
 * Recently drawn or uploaded traces kept parsed (up to a few million samples
 * in all), so drawing a trace just uploaded, or moving between traces, does
 * not read the file again. Keyed by stored file and the settings it is read with.
 */
const parsedCache = new Map<string, ParsedTrace>();
const PARSED_CACHE_SAMPLES = 4_000_000;

function parsedKey(ctx: AppContext, rawPath: string, settings: TraceSettings) {
  return `${ctx.config.uploadDir}:${rawPath}:${JSON.stringify(parseOptions(settings, ctx.config.maxUploadBytes))}`;
}

export function rememberParsed(ctx: AppContext, rawPath: string, settings: TraceSettings, parsed: ParsedTrace) {
  const key = parsedKey(ctx, rawPath, settings);
  parsedCache.delete(key);
  parsedCache.set(key, parsed);
  let total = 0;
  for (const p of parsedCache.values()) total += p.amplitude.length;
  for (const [k, p] of parsedCache) {
    if (total <= PARSED_CACHE_SAMPLES || parsedCache.size <= 1) break;
    parsedCache.delete(k);
    total -= p.amplitude.length;
  }
}

/** A stored trace's samples: from the cache, or read again in the analysis pool (never on the request thread). */
export async function parsedSamples(ctx: AppContext, trace: Trace): Promise<ParsedTrace | null> {
  if (trace.status !== 'ok') return null;
  const hit = parsedCache.get(parsedKey(ctx, trace.rawPath, trace.settings));
  if (hit) return hit;
  let copy;
  try {
    copy = await ctx.storage.checkout(trace.rawPath, trace.sha256);
  } catch (err) {
    ctx.log(`a stored trace could not be read again (${trace.rawPath})`, (err as Error).message);
    return null;
  }
  const parsed = await analysisPool(ctx)
    .read({ path: copy.path, settings: trace.settings, maxBytes: ctx.config.maxUploadBytes })
    .finally(() => copy.release());
  if (parsed) rememberParsed(ctx, trace.rawPath, trace.settings, parsed);
  return parsed;
}

/** values·scale + offset, as a new array (a plain loop: this runs on every view of large traces). */
function scaled(values: Float64Array, scale: number, offset = 0): Float64Array {
  const out = new Float64Array(values.length);
  for (let i = 0; i < values.length; i++) out[i] = values[i] * scale + offset;
  return out;
}

/** The time (ns, on the file's axis) that distance zero sits at. */
export function zeroTimeNs(a: TraceAnalysis, settings: TraceSettings): number {
  return settings.zeroOffsetNs ?? a.launch.timeNs;
}

function toPoints(x: Float64Array, y: Float64Array, buckets: number) {
  return decimateMinMax(x, y, buckets).map((p) => ({ t: p.x, y: p.y }));
}

/** Point counts kept per trace's samples: the page's usual one and a few zoomed ones. */
const VIEW_POINT_COUNTS_KEPT = 4;
const viewPoints = new WeakMap<ParsedTrace, Map<number, Array<{ t: number; y: number }>>>();

/**
 * A trace's samples reduced to `points` for its page, worked out once per point count while its samples are
 * cached (reducing 600,000 samples takes tens of milliseconds on the request thread, and many people may
 * open one trace at once). The answer is shared: callers must not change it.
 */
export function samplePoints(parsed: ParsedTrace, points: number): Array<{ t: number; y: number }> {
  let byCount = viewPoints.get(parsed);
  if (!byCount) viewPoints.set(parsed, (byCount = new Map()));
  let hit = byCount.get(points);
  if (!hit) {
    hit = toPoints(scaled(parsed.timeS, 1e9), parsed.amplitude, points);
    if (byCount.size >= VIEW_POINT_COUNTS_KEPT) byCount.delete(byCount.keys().next().value!);
    byCount.set(points, hit);
  }
  return hit;
}

async function comparison(
  ctx: AppContext,
  trace: Trace,
  parsed: ParsedTrace,
  points: number,
  compareTo?: number,
): Promise<TraceComparison | null> {
  let ref: Trace | null = null;
  if (compareTo) {
    ref = await Trace.findByPk(compareTo);
    if (!ref) throw AppError.notFound(`Trace ${compareTo}`);
    if (ref.cableRunId !== trace.cableRunId || ref.end !== trace.end) {
      throw new AppError(
        422,
        'not_comparable',
        'A trace can only be compared with another of the same cable run, taken from the same end.',
        {
          fields: [{ field: 'compareTo', message: 'must be a trace of the same run and end' }],
        },
      );
    }
  } else {
    ref = await Trace.findOne({ where: { cableRunId: trace.cableRunId, end: trace.end, isReference: true, status: 'ok' } });
  }
  if (!ref || ref.id === trace.id || ref.status !== 'ok' || !ref.analysis || !trace.analysis) return null;
  const refParsed = await parsedSamples(ctx, ref);
  if (!refParsed) return null;
  const z = zeroTimeNs(trace.analysis, trace.settings);
  const zr = zeroTimeNs(ref.analysis, ref.settings);
  const xs = scaled(parsed.timeS, 1e9);
  const refXs = scaled(refParsed.timeS, 1e9, z - zr);
  const refOnto = resampleOnto(refXs, refParsed.amplitude, xs);
  const diff = new Float64Array(parsed.amplitude.length);
  for (let i = 0; i < diff.length; i++) diff[i] = parsed.amplitude[i] - refOnto[i];
  const match = matchEvents(trace.analysis.events, ref.analysis.events);
  return {
    referenceTraceId: ref.id,
    referenceName: ref.originalName,
    reference: toPoints(xs, refOnto, points),
    difference: toPoints(xs, diff, points),
    newEventIndexes: match.newEvents.map((e) => e.index),
    missingReferenceEvents: match.missing.map((e) => ({ index: e.index, distanceM: e.distanceM, type: e.type })),
  };
}

/**
 * One trace as its page shows it (and as an upload's answer shows it): the
 * run, the cable and the trace's findings are each read once, now, so a cable
 * or run changed while the file was being analysed shows as changed.
 */
export async function getTrace(
  ctx: AppContext,
  id: number,
  opts: { points: number; compareTo?: number } = { points: 2000 },
): Promise<TraceDetail> {
  const trace = await Trace.findByPk(id);
  if (!trace) throw AppError.notFound(`Trace ${id}`);
  const rows: Promise<TraceRows> = CableRun.findByPk(trace.cableRunId).then(async (r) => ({
    run: r!,
    cable: await CableType.findByPk(r!.cableTypeId),
  }));
  const findingRows = Finding.findAll({ where: { traceId: id }, order: [['eventIndex', 'ASC']] });
  // Independent reads side by side: one wait instead of one per query.
  const [[summary], { run, cable }, markers, findings, parsed, newer] = await Promise.all([
    Promise.all([rows, findingRows]).then(([r, f]) => summaries([trace], { runs: [r.run], findings: f })),
    rows,
    RouteMarker.findAll({ where: { cableRunId: trace.cableRunId }, order: [['chainageM', 'ASC']] }),
    findingRows,
    parsedSamples(ctx, trace),
    Trace.findAll({ where: { reanalysisOfId: id }, attributes: ['id'], order: [['id', 'ASC']] }),
  ]);
  const libraryRevision = cable?.revision;
  // Analysed as another cable type than the run's now (the run was given another since): its revision says nothing of this one.
  const otherType = !!cable && trace.cableTypeId !== null && trace.cableTypeId !== cable.id;
  const analysedAs = otherType ? await CableType.findByPk(trace.cableTypeId!, { attributes: ['id', 'name'] }) : null;
  return {
    ...summary,
    settings: trace.settings,
    vf: trace.vf,
    vfTolerance: trace.vfTolerance,
    z0Ohm: trace.z0Ohm,
    vfOverrideReason: trace.vfOverrideReason,
    engineVersion: trace.engineVersion,
    cableTypeRevision: trace.cableTypeRevision,
    reanalysisOfId: trace.reanalysisOfId,
    reanalysedAs: newer.map((t) => t.id),
    libraryChangedSince:
      !!cable &&
      (otherType ||
        (trace.cableTypeRevision !== null && libraryRevision !== undefined
          ? libraryRevision > trace.cableTypeRevision
          : trace.settings.vfOverride === undefined && (cable.vf !== trace.vf || cable.vfTolerance !== trace.vfTolerance))),
    analysedCableType: otherType ? { id: trace.cableTypeId!, name: analysedAs?.name ?? `cable type ${trace.cableTypeId}` } : null,
    error:
      trace.status === 'failed'
        ? {
            code: trace.errorCode ?? 'UNKNOWN',
            message: trace.errorMessage ?? '',
            line: trace.errorLine,
            field: trace.errorField,
          }
        : null,
    analysis: boundedAnalysis(trace.analysis),
    zeroNs: trace.analysis ? zeroTimeNs(trace.analysis, trace.settings) : 0,
    samples: parsed ? samplePoints(parsed, opts.points) : [],
    sampleCount: parsed?.amplitude.length ?? 0,
    cableRun: {
      id: run.id,
      name: run.name,
      installedLengthM: run.installedLengthM,
      endALabel: run.endALabel,
      endBLabel: run.endBLabel,
      cableTypeName: cable?.name ?? '',
      markers: markers.map(markerView),
    },
    findings: findings.map((f) => ({ id: f.id, eventIndex: f.eventIndex, status: f.status, kind: f.kind })),
    comparison: parsed ? await comparison(ctx, trace, parsed, opts.points, opts.compareTo) : null,
    deviceAnalysis: trace.deviceAnalysis ?? null,
  };
}

/**
 * A stored trace's file for download: a local copy checked against its SHA-256 (the stored file itself with the
 * folder store), to be sent as the client reads it, then released. Never the whole file held in memory per download.
 */
export async function rawFile(ctx: AppContext, id: number) {
  const trace = await Trace.findByPk(id);
  if (!trace) throw AppError.notFound(`Trace ${id}`);
  const copy = await ctx.storage.checkout(trace.rawPath, trace.sha256);
  return { ...copy, name: trace.originalName, sha256: trace.sha256 };
}

/** At most one reference per run and end; setting one clears the previous. */
export async function setReference(sequelize: Sequelize, id: number, isReference: boolean) {
  await sequelize.transaction(async (transaction) => {
    // Held while the checks run, as archiveTrace holds it: an archive at the same moment either comes first (and
    // this sees the trace archived) or waits and sees it is the reference. PostgreSQL runs the two side by side.
    const trace = await Trace.findByPk(id, { transaction, lock: transaction.LOCK.UPDATE });
    if (!trace) throw AppError.notFound(`Trace ${id}`);
    if (isReference && trace.archivedAt) {
      // Archiving refuses the reference trace; an archived one does not become it either.
      throw new AppError(
        409,
        'trace_archived',
        `Trace ${id} is archived as junk: an administrator restores it before it can be the reference.`,
        {
          fields: [{ field: 'traceId', message: 'the trace is archived' }],
        },
      );
    }
    if (isReference && trace.status === 'pending') throw pendingConflict(id, 'used as the reference');
    if (isReference && trace.status !== 'ok') {
      throw new AppError(422, 'trace_failed', 'A trace the engine could not read cannot be the reference.');
    }
    if (isReference) {
      await Trace.update(
        { isReference: false },
        { where: { cableRunId: trace.cableRunId, end: trace.end, isReference: true }, transaction },
      );
    }
    await trace.update({ isReference }, { transaction });
  });
}
