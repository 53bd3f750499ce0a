import { AsyncLocalStorage } from 'node:async_hooks';
import { Mutex } from 'async-mutex';
import { Sequelize, type Options, type Transaction, type TransactionOptions } from 'sequelize';
import { databaseBusy, isBusyError } from '../errors';

/** How many times one write transaction is tried before the caller hears "busy". */
export const WRITE_TRIES = 6;
/** Back-off before the n-th retry: base·2^(n-1) ms, with full jitter. */
const RETRY_BASE_MS = 25;

export type WriteRule = 'single-writer' | 'pool';

const sleep = (ms: number) => new Promise((resolve) => setTimeout(resolve, ms));

/**
 * A Sequelize whose `transaction()` follows the write rules, so every service
 * gets them without doing anything:
 *
 * - SQLite ('single-writer'): write transactions run one at a time in this
 *   process. SQLite takes one writer at a time anyway; queueing here instead
 *   of inside SQLite means no transaction waits on a busy lock while holding a
 *   libuv thread, and the busy timeout (set on every connection, see
 *   connection.ts) only has to cover other processes.
 * - PostgreSQL ('pool'): transactions run side by side on the pool.
 *
 * On both, a managed transaction (`transaction(fn)`) that fails because the
 * database was busy is rolled back and run again, at most WRITE_TRIES times
 * with jittered back-off; then it fails with 503 database_busy, never a 500.
 * A transaction started inside another one (same async context) is left
 * alone, so a nested call cannot wait on itself.
 */
export class WriteQueuedSequelize extends Sequelize {
  readonly writeRule: WriteRule;
  private readonly writer = new Mutex();
  private readonly inside = new AsyncLocalStorage<true>();

  /** `(rule, options)` or `(rule, url, options)`, as Sequelize's own constructor takes them. */
  constructor(writeRule: WriteRule, ...args: [options: Options] | [url: string, options: Options]) {
    super(...(args as [string, Options]));
    this.writeRule = writeRule;
  }

  override transaction<T>(options: TransactionOptions, autoCallback: (t: Transaction) => PromiseLike<T>): Promise<T>;
  override transaction<T>(autoCallback: (t: Transaction) => PromiseLike<T>): Promise<T>;
  override transaction(options?: TransactionOptions): Promise<Transaction>;
  override transaction<T>(a?: TransactionOptions | ((t: Transaction) => PromiseLike<T>), b?: (t: Transaction) => PromiseLike<T>): Promise<T | Transaction> {
    const options: TransactionOptions = typeof a === 'function' ? {} : (a ?? {});
    const fn = typeof a === 'function' ? a : b;
    if (options.transaction || this.inside.getStore()) {
      return fn ? super.transaction(options, fn) : super.transaction(options);
    }
    return fn ? this.managed(options, fn) : this.unmanaged(options);
  }

  private async managed<T>(options: TransactionOptions, fn: (t: Transaction) => PromiseLike<T>): Promise<T> {
    for (let attempt = 1; ; attempt++) {
      try {
        return await this.exclusive(() => this.inside.run(true, () => super.transaction(options, fn)));
      } catch (err) {
        if (!isBusyError(err)) throw err;
        if (attempt >= WRITE_TRIES) throw databaseBusy();
        await sleep(Math.random() * RETRY_BASE_MS * 2 ** (attempt - 1));
      }
    }
  }

  /** Sequelize itself opens unmanaged ones (findOrCreate); the writer slot is held until commit or rollback. */
  private async unmanaged(options: TransactionOptions): Promise<Transaction> {
    if (this.writeRule !== 'single-writer') return super.transaction(options);
    const release = await this.writer.acquire();
    let t: Transaction;
    try {
      t = await super.transaction(options);
    } catch (err) {
      release();
      throw isBusyError(err) ? databaseBusy() : err;
    }
    let released = false;
    const once = () => {
      if (!released) {
        released = true;
        release();
      }
    };
    const commit = t.commit.bind(t);
    const rollback = t.rollback.bind(t);
    t.commit = async () => {
      try {
        await commit();
      } finally {
        once();
      }
    };
    t.rollback = async () => {
      try {
        await rollback();
      } finally {
        once();
      }
    };
    return t;
  }

  private exclusive<T>(run: () => Promise<T>): Promise<T> {
    return this.writeRule === 'single-writer' ? this.writer.runExclusive(run) : run();
  }
}
