import { randomUUID } from 'node:crypto';
import PgBoss from 'pg-boss';
import { runAsJob } from '../log';
import type { JobHandler, JobKind, JobQueue, JobState } from './queue';

export interface PgBossOptions {
  connectionString: string;
  /** How often some instance looks for jobs whose lease ran out (their instance died) and hands them out again. */
  maintenanceSeconds: number;
  /** How often an idle worker looks for new jobs (a job sent by this instance is picked up at once). */
  pollSeconds: number;
  log: (message: string, extra?: unknown) => void;
}

const STATES: Record<string, JobState> = {
  created: 'waiting',
  retry: 'retrying',
  active: 'running',
  completed: 'done',
  cancelled: 'failed',
  failed: 'failed',
};

/**
 * Jobs kept in PostgreSQL by pg-boss (its own schema, `pgboss`, which it
 * creates and migrates itself under an advisory lock). A worker takes a job
 * with SELECT … FOR UPDATE SKIP LOCKED, so each job runs on one instance; a
 * job still active after its lease (the instance was killed) is failed by the
 * maintenance of whichever instance runs it next and retried elsewhere.
 */
export class PgBossQueue implements JobQueue {
  readonly engine = 'pg-boss' as const;
  private readonly boss: PgBoss;
  private readonly abort = new AbortController();

  private constructor(
    boss: PgBoss,
    private readonly options: PgBossOptions,
  ) {
    this.boss = boss;
  }

  static async start(options: PgBossOptions): Promise<PgBossQueue> {
    const boss = new PgBoss({
      connectionString: options.connectionString,
      schema: 'pgboss',
      application_name: 'rholog-jobs',
      max: 4,
      supervise: true,
      schedule: false,
      maintenanceIntervalSeconds: options.maintenanceSeconds,
      monitorStateIntervalSeconds: Math.max(options.maintenanceSeconds, 60),
    });
    boss.on('error', (err) => options.log('job queue error', err.message));
    await boss.start();
    return new PgBossQueue(boss, options);
  }

  async define<T extends object>(name: string, kind: JobKind, handler: JobHandler<T>) {
    const queue = { name, retryLimit: kind.retryLimit, retryDelay: kind.retryDelaySeconds, retryBackoff: true, expireInSeconds: kind.leaseSeconds };
    if (await this.boss.getQueue(name)) await this.boss.updateQueue(name, queue);
    else {
      try {
        await this.boss.createQueue(name, queue);
      } catch (err) {
        // Another instance created it at the same moment.
        if (!(await this.boss.getQueue(name))) throw err;
      }
    }
    await this.boss.work<T>(name, { batchSize: 1, pollingIntervalSeconds: this.options.pollSeconds }, async ([job]) => {
      // Each run logs with its own ids (a retry is a new run of the same job), never a request's.
      await runAsJob({ job: name, jobId: job.id, jobRunId: randomUUID() }, () => handler(job.data, { id: job.id, signal: this.abort.signal }));
    });
  }

  async send<T extends object>(name: string, data: T): Promise<string> {
    const id = await this.boss.send(name, data);
    if (!id) throw new Error(`the job queue refused a ${name} job`);
    return id;
  }

  async state(name: string, id: string): Promise<JobState | null> {
    const job = await this.boss.getJobById(name, id, { includeArchive: true });
    return job ? (STATES[job.state] ?? null) : null;
  }

  async unfinished<T extends object>(name: string): Promise<T[]> {
    const { rows } = await this.boss.getDb().executeSql("SELECT data FROM pgboss.job WHERE name = $1 AND state IN ('created', 'retry', 'active')", [name]);
    return rows.map((r: { data: T }) => r.data);
  }

  async ping() {
    await this.boss.getDb().executeSql('SELECT 1 FROM pgboss.version', []);
  }

  async stop(graceMs: number) {
    // Long jobs check the signal between steps: near the end of the grace period they stop and are handed back.
    const timer = setTimeout(() => this.abort.abort(), Math.max(0, graceMs - 500));
    try {
      await this.boss.stop({ graceful: true, timeout: Math.max(1000, graceMs), wait: true });
    } finally {
      clearTimeout(timer);
    }
  }
}
