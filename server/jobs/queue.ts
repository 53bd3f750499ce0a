/**
 * Background jobs behind one interface. On PostgreSQL the jobs live in the
 * database (pg-boss), so any instance may run any job, each job runs once,
 * a job whose instance died is handed to another after its lease runs out,
 * and a failed job is retried with a growing delay. On SQLite (one instance)
 * the same interface runs the jobs in this process.
 */
export interface JobKind {
  /** Tries after the first before the job is marked failed. */
  retryLimit: number;
  /** First retry after this many seconds; each later one waits twice as long. */
  retryDelaySeconds: number;
  /** A job still running after this long is taken to have died with its instance and is given to another. */
  leaseSeconds: number;
}

export interface RunningJob {
  id: string;
  /** Set when this instance is stopping: a long job stops between steps and throws, so another instance takes it over. */
  signal: AbortSignal;
}

export type JobHandler<T> = (data: T, job: RunningJob) => Promise<void>;

export type JobState = 'waiting' | 'running' | 'retrying' | 'done' | 'failed';

export interface JobQueue {
  readonly engine: 'pg-boss' | 'in-process';
  /** Declare a kind of job and run its jobs in this instance. */
  define<T extends object>(name: string, kind: JobKind, handler: JobHandler<T>): Promise<void>;
  /** Queue a job; it runs after the caller's transaction (if any) has committed, so send after commit. */
  send<T extends object>(name: string, data: T): Promise<string>;
  state(name: string, id: string): Promise<JobState | null>;
  /** The data of this kind's jobs not yet finished (waiting, running or waiting for a retry), on any instance. */
  unfinished<T extends object>(name: string): Promise<T[]>;
  /** Throws when the queue's store cannot be reached. */
  ping(): Promise<void>;
  /** Take no new jobs; wait up to graceMs for the running ones, then give them back to the queue. */
  stop(graceMs: number): Promise<void>;
}

/** Back-off: base, 2·base, 4·base, … seconds, capped at one hour. */
export function retryDelaySeconds(retriesSoFar: number, baseSeconds: number): number {
  return Math.min(3600, baseSeconds * 2 ** Math.max(0, retriesSoFar));
}

/** The error a job throws when it stops because its instance is shutting down. */
export class JobReleased extends Error {
  constructor() {
    super('this instance is stopping; the job goes back to the queue');
  }
}
