import type { Sequelize } from 'sequelize';
import type { AppConfig } from './config';
import type { Logger, SecurityLog } from './log';
import type { JobQueue } from './jobs/queue';
import type { MailSystem } from './mail';
import type { RawStorage } from './storage/raw-storage';

/** What route modules and services get from createApp(); features add their long-lived pieces here. */
export interface AppContext {
  config: AppConfig;
  sequelize: Sequelize;
  /** Called on close(), last registered first. */
  onClose: Array<() => Promise<void> | void>;
  /** A line in the structured log at info level (kept for short messages; `logger` for the rest). */
  log: (message: string, extra?: unknown) => void;
  /** The structured (JSON) log. */
  logger: Logger;
  /** Sign-ins, role changes, password changes and overrides: `ctx.security('role-changed', { userId, actorId })`. */
  security: SecurityLog;
  /** Outgoing mail: ctx.mail.queue.enqueue(job, transaction) inside the change's transaction. */
  mail: MailSystem;
  /** Background jobs: ctx.jobs.send(name, data) after the change that asks for them has committed. */
  jobs: JobQueue;
  /** Raw trace files (a local folder or S3-compatible object storage); every read checks the SHA-256. */
  storage: RawStorage;
}
