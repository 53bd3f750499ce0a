import { randomUUID } from 'node:crypto';
import { runAsJob } from '../log';
import { JobReleased, retryDelaySeconds, type JobHandler, type JobKind, type JobQueue, type JobState } from './queue';

interface Entry {
  id: string;
  name: string;
  data: object;
  retries: number;
  state: JobState;
  timer?: NodeJS.Timeout;
}

/** How many finished jobs' ends state() still answers for. */
const FINISHED_KEPT = 1000;

/**
 * Jobs run in this process (SQLite: one instance). Same behaviour as the
 * database-backed queue inside one process: one job of a kind at a time,
 * retries with back-off, and a stop that waits for running jobs and then
 * calls them off. Jobs waiting in memory end with the process; work that
 * must survive a restart keeps its own record in the database and is queued
 * again at start (the cable re-analysis does). A finished job is dropped
 * (only how it ended is kept, for the last 1000), so a long-running server
 * does not gather every job it ever ran; each run of a job logs with its own
 * ids (`runAsJob`), not those of the request that queued it.
 */
export class InProcessQueue implements JobQueue {
  readonly engine = 'in-process' as const;
  private readonly kinds = new Map<string, { kind: JobKind; handler: JobHandler<object>; waiting: Entry[]; running: Promise<void> | null }>();
  /** Jobs not yet finished: waiting, running or waiting for a retry. A finished job leaves, with its data. */
  private readonly jobs = new Map<string, Entry>();
  /** How the last FINISHED_KEPT finished jobs ended, for state(); older ones are forgotten. */
  private readonly finished = new Map<string, 'done' | 'failed'>();
  private readonly abort = new AbortController();
  private stopped = false;

  constructor(private readonly log: (message: string, extra?: unknown) => void = () => undefined) {}

  async define<T extends object>(name: string, kind: JobKind, handler: JobHandler<T>) {
    this.kinds.set(name, { kind, handler: handler as JobHandler<object>, waiting: [], running: null });
  }

  async send<T extends object>(name: string, data: T): Promise<string> {
    const k = this.kinds.get(name);
    if (!k) throw new Error(`no job kind "${name}" is defined`);
    const entry: Entry = { id: randomUUID(), name, data, retries: 0, state: 'waiting' };
    this.jobs.set(entry.id, entry);
    k.waiting.push(entry);
    queueMicrotask(() => this.next(name));
    return entry.id;
  }

  async unfinished<T extends object>(name: string): Promise<T[]> {
    return [...this.jobs.values()].filter((e) => e.name === name).map((e) => e.data as T);
  }

  async state(_name: string, id: string): Promise<JobState | null> {
    return this.jobs.get(id)?.state ?? this.finished.get(id) ?? null;
  }

  /** How many jobs the queue holds in memory (not yet finished). */
  get held(): number {
    return this.jobs.size;
  }

  private finish(entry: Entry, state: 'done' | 'failed') {
    entry.state = state;
    this.jobs.delete(entry.id);
    this.finished.set(entry.id, state);
    if (this.finished.size > FINISHED_KEPT) this.finished.delete(this.finished.keys().next().value!);
  }

  async ping() {
    if (this.stopped) throw new Error('the job queue is stopped');
  }

  private next(name: string) {
    const k = this.kinds.get(name)!;
    if (this.stopped || k.running) return;
    const entry = k.waiting.shift();
    if (!entry) return;
    entry.state = 'running';
    k.running = runAsJob({ job: name, jobId: entry.id, jobRunId: randomUUID() }, () =>
      k
        .handler(entry.data, { id: entry.id, signal: this.abort.signal })
        .then(
          () => this.finish(entry, 'done'),
          (err: unknown) => this.failed(entry, k.kind, err),
        )
        .finally(() => {
          k.running = null;
          this.next(name);
        }),
    );
  }

  private failed(entry: Entry, kind: JobKind, err: unknown) {
    if (err instanceof JobReleased || this.stopped) {
      entry.state = 'waiting';
      return;
    }
    if (entry.retries >= kind.retryLimit) {
      this.finish(entry, 'failed');
      this.log(`job ${entry.name} ${entry.id} failed for good after ${entry.retries + 1} tries`, (err as Error)?.message ?? String(err));
      return;
    }
    const delayS = retryDelaySeconds(entry.retries, kind.retryDelaySeconds);
    entry.retries += 1;
    entry.state = 'retrying';
    this.log(`job ${entry.name} ${entry.id} failed; retry ${entry.retries} of ${kind.retryLimit} in ${delayS} s`, (err as Error)?.message ?? String(err));
    entry.timer = setTimeout(() => {
      entry.timer = undefined;
      this.kinds.get(entry.name)!.waiting.push(entry);
      this.next(entry.name);
    }, delayS * 1000);
    entry.timer.unref();
  }

  async stop(graceMs: number) {
    this.stopped = true;
    for (const e of this.jobs.values()) if (e.timer) clearTimeout(e.timer);
    const running = [...this.kinds.values()].map((k) => k.running).filter((p): p is Promise<void> => p !== null);
    let timer: NodeJS.Timeout | undefined;
    const late = new Promise<'late'>((resolve) => (timer = setTimeout(() => resolve('late'), graceMs)));
    if ((await Promise.race([Promise.all(running), late])) === 'late') {
      this.abort.abort();
      await Promise.all(running);
    }
    clearTimeout(timer);
  }
}
