import type { AppConfig } from '../config';
import { dialectOf } from '../db/connection';
import { InProcessQueue } from './in-process-queue';
import { PgBossQueue } from './pg-boss-queue';
import type { JobQueue } from './queue';

export * from './queue';

/** The job queue for this database: pg-boss on PostgreSQL, in-process on SQLite. */
export async function startJobs(config: AppConfig, log: (message: string, extra?: unknown) => void): Promise<JobQueue> {
  if (dialectOf(config.databaseUrl) === 'postgres') {
    return PgBossQueue.start({ connectionString: config.databaseUrl, maintenanceSeconds: config.jobs.maintenanceSeconds, pollSeconds: config.jobs.pollSeconds, log });
  }
  return new InProcessQueue(log);
}
