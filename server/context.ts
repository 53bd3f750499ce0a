import type { Sequelize } from 'sequelize';
import type { AppConfig } from './config';
import type { MailSystem } from './mail';

/** What route modules and services get from createApp(); features add their long-lived pieces here. */
export interface AppContext {
  config: AppConfig;
  sequelize: Sequelize;
  /** Called on close(), last registered first. */
  onClose: Array<() => Promise<void> | void>;
  log: (message: string, extra?: unknown) => void;
  /** Outgoing mail: ctx.mail.queue.enqueue(job, transaction) inside the change's transaction. */
  mail: MailSystem;
}
