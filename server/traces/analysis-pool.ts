import { createHash } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { MessageChannel } from 'node:worker_threads';
import { Piscina } from 'piscina';
import type { AppContext } from '../context';
import type { ParsedTrace } from '../../shared/trace';
import { failedOutcome, type Outcome } from './analysis';
import type { AnalyseResult, AnalyseTask, ReadResult, ReadTask, WorkerTask } from './analysis-worker';

export interface AnalysisBudget {
  threads: number;
  /** Wall time one file may take once its analysis has started. */
  timeoutMs: number;
  /** V8 heap one analysis worker may use. */
  memoryMb: number;
}

const here = path.dirname(fileURLToPath(import.meta.url));

/**
 * The worker's entry file. A built server (plain JavaScript) has the worker
 * built beside it; from TypeScript source (tsx, vitest) a small ES module
 * loads the TypeScript worker through tsx.
 */
export function workerEntry(): string {
  if (import.meta.url.endsWith('.js')) {
    for (const candidate of [path.join(here, 'analysis-worker.js'), path.join(here, 'traces', 'analysis-worker.js')]) {
      if (fs.existsSync(candidate)) return candidate;
    }
    throw new Error(`The analysis worker was not built beside the server (looked for analysis-worker.js in ${here} and ${path.join(here, 'traces')}): build server/traces/analysis-worker.ts with the server.`);
  }
  return path.join(here, 'analysis-worker.boot.mjs');
}

async function hashFile(file: string): Promise<{ sha256: string; sizeBytes: number }> {
  const hash = createHash('sha256');
  let sizeBytes = 0;
  for await (const chunk of fs.createReadStream(file)) {
    hash.update(chunk as Buffer);
    sizeBytes += (chunk as Buffer).length;
  }
  return { sha256: hash.digest('hex'), sizeBytes };
}

/** How long a file may wait for a free worker, beyond its own time budget. */
const QUEUE_WAIT_MS = 120_000;

const seconds = (ms: number) => `${Math.round(ms / 100) / 10} s`;

/**
 * The trace engine off the request thread: a pool of worker threads (as many
 * as the budget says, at most one per core by default), each file with a time
 * and a memory budget. A file over either budget, or one that crashes its
 * worker, still gets an answer: a failed outcome saying why, with the file's
 * SHA-256 and size, so it is stored like any unreadable file.
 */
type Pool = Piscina<WorkerTask, AnalyseResult | ReadResult>;

/** A task handed to the pool and not yet started, and why it was called off (if it was). */
interface Waiting {
  pool: Pool;
  abort: AbortController;
  calledOff?: unknown;
}

export class AnalysisPool {
  private pool: Pool | null = null;
  private readonly waiting = new Set<Waiting>();
  /** Per owner, the end of the last piece of work handed in (see `analyse`). */
  private readonly owners = new Map<string, Promise<void>>();
  private keepOneReady = false;

  constructor(
    readonly budget: AnalysisBudget,
    private readonly log: (message: string, extra?: unknown) => void = () => undefined,
  ) {}

  /** Start one worker now, and keep one ready, so the first upload does not wait for a worker to load the engine. */
  warm() {
    this.keepOneReady = true;
    this.current();
  }

  /** Runs `fn` after the work of `owner` handed in before it: each owner's files enter the pool's queue one at a time. */
  private async inTurn<T>(owner: string, fn: () => Promise<T>): Promise<T> {
    const before = this.owners.get(owner) ?? Promise.resolve();
    const mine = before.then(fn, fn);
    const settled = mine.then(
      () => undefined,
      () => undefined,
    );
    this.owners.set(owner, settled);
    try {
      return await mine;
    } finally {
      if (this.owners.get(owner) === settled) this.owners.delete(owner);
    }
  }

  private current(): Pool {
    if (this.pool) return this.pool;
    const pool: Pool = new Piscina({
      filename: workerEntry(),
      minThreads: this.keepOneReady ? 1 : 0,
      // A server that keeps a worker ready also has each worker compile the engine as it starts.
      workerData: { warmEngine: this.keepOneReady },
      maxThreads: this.budget.threads,
      idleTimeout: 60_000,
      resourceLimits: { maxOldGenerationSizeMb: this.budget.memoryMb, maxYoungGenerationSizeMb: Math.max(4, Math.round(this.budget.memoryMb / 8)) },
    });
    // A worker that fails outside any task failed while starting. The pool then starts no more workers, so the
    // files waiting for one are called off with that reason, and the next file gets a fresh pool.
    pool.on('error', (err) => this.workerFailedToStart(pool, err));
    this.pool = pool;
    return pool;
  }

  private workerFailedToStart(pool: Pool, err: unknown) {
    this.log('an analysis worker failed while starting', err);
    if (this.pool === pool) this.pool = null;
    for (const w of this.waiting) {
      if (w.pool !== pool) continue;
      w.calledOff = err;
      w.abort.abort();
    }
    pool.close().catch(() => undefined);
  }

  /**
   * Hash, parse and analyse one file. Never throws for the file's sake: a file over budget is a failed outcome.
   * Files of one `owner` (the person waiting for them) go to the threads one at a time, so one person sending many
   * files, in one upload or in several, makes another person's file wait for at most one of theirs, not all.
   */
  async analyse(task: Omit<AnalyseTask, 'kind' | 'started'>, options: { owner?: string } = {}): Promise<AnalyseResult> {
    return options.owner === undefined ? this.analyseNow(task) : this.inTurn(options.owner, () => this.analyseNow(task));
  }

  private async analyseNow(task: Omit<AnalyseTask, 'kind' | 'started'>): Promise<AnalyseResult> {
    const run = await this.run<AnalyseResult>({ ...task, kind: 'analyse' });
    if ('error' in run) return { ...(await hashFile(task.path)), outcome: run.error, parsed: null, elapsedMs: 0 };
    if (run.result.outcome.internal) this.log('the trace engine failed on a file', run.result.outcome.internal);
    return run.result;
  }

  /** The samples of a stored file, read in a worker; null (and a log line) when it cannot be read within budget. */
  async read(task: Omit<ReadTask, 'kind' | 'started'>): Promise<ParsedTrace | null> {
    const run = await this.run<ReadResult>({ ...task, kind: 'read' });
    if ('error' in run) {
      this.log(`a stored trace could not be read again (${task.path})`, run.error.error?.message);
      return null;
    }
    return run.result.parsed;
  }

  private async run<R extends AnalyseResult | ReadResult>(task: WorkerTask): Promise<{ result: R } | { error: Outcome }> {
    const { port1, port2 } = new MessageChannel();
    const abort = new AbortController();
    const pool = this.current();
    const waiting: Waiting = { pool, abort };
    this.waiting.add(waiting);
    let startedAt: number | null = null;
    // Until the work starts, only a generous ceiling for the wait (a worker that cannot even start must not hang the upload).
    let timer: NodeJS.Timeout | undefined = setTimeout(() => abort.abort(), this.budget.timeoutMs + QUEUE_WAIT_MS);
    port1.once('message', () => {
      startedAt = performance.now();
      this.waiting.delete(waiting);
      clearTimeout(timer);
      timer = setTimeout(() => abort.abort(), this.budget.timeoutMs);
    });
    try {
      const result = (await pool.run({ ...task, started: port2 }, { transferList: [port2], signal: abort.signal })) as R;
      // Late is over budget too, whether the timer or the worker's own clock noticed first.
      const tookMs = Math.max(result.elapsedMs, startedAt === null ? 0 : performance.now() - startedAt);
      if (tookMs > this.budget.timeoutMs) return { error: this.overTime() };
      return { result };
    } catch (err) {
      return { error: this.failure(waiting.calledOff ?? err, abort.signal.aborted && !waiting.calledOff, startedAt !== null) };
    } finally {
      this.waiting.delete(waiting);
      clearTimeout(timer);
      port1.close();
    }
  }

  private overTime(): Outcome {
    return failedOutcome(
      'ANALYSIS_TIMEOUT',
      `Analysing this file took longer than the ${seconds(this.budget.timeoutMs)} allowed for one file, so it was stopped. The file is kept; if it is a genuine record, export a shorter one from the instrument.`,
    );
  }

  private failure(err: unknown, timedOut: boolean, started: boolean): Outcome {
    if (timedOut && !started) {
      return failedOutcome(
        'ANALYSIS_NOT_STARTED',
        `The server was too busy to start analysing this file within ${seconds(this.budget.timeoutMs + QUEUE_WAIT_MS)}. The file is kept; analyse it again later.`,
      );
    }
    if (timedOut) return this.overTime();
    const code = (err as { code?: string })?.code;
    if (code === 'ERR_WORKER_OUT_OF_MEMORY') {
      return failedOutcome(
        'ANALYSIS_MEMORY',
        `Analysing this file needed more than the ${this.budget.memoryMb} MB of memory allowed for one file, so it was stopped. The file is kept; if it is a genuine record, export a shorter one from the instrument.`,
      );
    }
    this.log('an analysis worker failed', err);
    return failedOutcome('ENGINE_ERROR', `The trace engine stopped on this file (${(err as Error)?.message ?? String(err)}). The file is kept.`);
  }

  async close(): Promise<void> {
    const pool = this.pool;
    this.pool = null;
    await pool?.destroy();
  }
}

/**
 * Which pool a piece of work runs in. `request`: a file someone is waiting
 * for (an upload analysed at once, a re-analysis, reading a stored trace for
 * a page), with every thread of the budget. `background`: the analyses of
 * jobs (large uploads, a cable's re-analysis), in a pool of its own with one
 * thread, so a file someone is waiting for never queues behind them.
 */
export type AnalysisLane = 'request' | 'background';

const pools = new WeakMap<AppContext, Partial<Record<AnalysisLane, AnalysisPool>>>();

/** The app's analysis pool for a lane, made on first use and closed with the app. */
export function analysisPool(ctx: AppContext, lane: AnalysisLane = 'request'): AnalysisPool {
  let lanes = pools.get(ctx);
  if (!lanes) {
    lanes = {};
    pools.set(ctx, lanes);
  }
  let pool = lanes[lane];
  if (!pool) {
    const budget = lane === 'background' ? { ...ctx.config.analysis, threads: 1 } : ctx.config.analysis;
    const made = new AnalysisPool(budget, ctx.log);
    lanes[lane] = made;
    ctx.onClose.unshift(() => made.close());
    pool = made;
  }
  return pool;
}
