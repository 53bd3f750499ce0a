import { AsyncLocalStorage } from 'node:async_hooks';
import { Mutex } from 'async-mutex';
import { Sequelize, type Options, type QueryOptions, type Transaction, type TransactionOptions } from 'sequelize';
import { databaseBusy, isBusyError } from '../errors';

/** How many times one write transaction is tried before the caller hears "busy". */
export const WRITE_TRIES = 6;
/** Back-off before the n-th retry: base·2^(n-1) ms, with full jitter. */
const RETRY_BASE_MS = 25;

export type WriteRule = 'single-writer' | 'pool';

const sleep = (ms: number) => new Promise((resolve) => setTimeout(resolve, ms));

/** Statements that only read (they never wait for SQLite's write lock in WAL mode). */
const READ_SQL = /^\s*(SELECT|PRAGMA|EXPLAIN|VALUES)\b/i;
const READ_TYPES = new Set(['SELECT', 'SHOWTABLES', 'SHOWINDEXES', 'DESCRIBE', 'VERSION', 'FOREIGNKEYS', 'SHOWCONSTRAINTS']);

function isWriteStatement(sql: unknown, options: { type?: string } | undefined): boolean {
  const text = typeof sql === 'string' ? sql : ((sql as { query?: string } | null)?.query ?? '');
  if (options?.type && READ_TYPES.has(options.type)) return false;
  if (options?.type && options.type !== 'RAW') return true;
  return !READ_SQL.test(text);
}

/**
 * A Sequelize whose writes follow the write rules, so every service (and the
 * session store) gets them without doing anything:
 *
 * - SQLite ('single-writer'): write transactions, and single writing
 *   statements outside a transaction, take turns through one queue in this
 *   process. SQLite takes one writer at a time anyway; queueing here instead
 *   of inside SQLite matters because node-sqlite3 runs statements on libuv's
 *   few worker threads: a statement busy-waiting for the write lock holds a
 *   thread, and enough of them starve the very transaction they wait for.
 *   The busy timeout (set on every connection, see connection.ts) is then
 *   only for other processes. Reads never queue (WAL lets them run beside a writer).
 * - PostgreSQL ('pool'): transactions run side by side on the pool.
 *
 * On both, a managed transaction (`transaction(fn)`) or a single write that
 * fails because the database was busy is run again, at most WRITE_TRIES
 * times with jittered back-off; then it fails with 503 database_busy, never
 * a 500. Work started inside a transaction (same async context) skips the
 * queue, so it cannot wait on itself.
 */
export class WriteQueuedSequelize extends Sequelize {
  readonly writeRule: WriteRule;
  private readonly writer = new Mutex();
  /** Set while a queued write runs; work it starts sees `open` turn false once that write is done. */
  private readonly inside = new AsyncLocalStorage<{ open: boolean }>();

  /** `(rule, options)` or `(rule, url, options)`, as Sequelize's own constructor takes them. */
  constructor(writeRule: WriteRule, ...args: [options: Options] | [url: string, options: Options]) {
    super(...(args as [string, Options]));
    this.writeRule = writeRule;
    if (writeRule === 'single-writer') {
      // Every query of the models, the query interface and the session store comes through here.
      const query = this.query.bind(this) as (sql: unknown, options?: QueryOptions) => Promise<unknown>;
      this.query = ((sql: unknown, options?: QueryOptions) => {
        if (options?.transaction || this.insideWrite() || !isWriteStatement(sql, options as { type?: string })) return query(sql, options);
        return this.withRetries(() => this.writer.runExclusive(() => this.holding(() => query(sql, options))));
      }) as Sequelize['query'];
    }
  }

  override transaction<T>(options: TransactionOptions, autoCallback: (t: Transaction) => PromiseLike<T>): Promise<T>;
  override transaction<T>(autoCallback: (t: Transaction) => PromiseLike<T>): Promise<T>;
  override transaction(options?: TransactionOptions): Promise<Transaction>;
  override transaction<T>(a?: TransactionOptions | ((t: Transaction) => PromiseLike<T>), b?: (t: Transaction) => PromiseLike<T>): Promise<T | Transaction> {
    const options: TransactionOptions = typeof a === 'function' ? {} : (a ?? {});
    const fn = typeof a === 'function' ? a : b;
    if (options.transaction || this.insideWrite()) {
      return fn ? super.transaction(options, fn) : super.transaction(options);
    }
    return fn ? this.managed(options, fn) : this.unmanaged(options);
  }

  private managed<T>(options: TransactionOptions, fn: (t: Transaction) => PromiseLike<T>): Promise<T> {
    return this.withRetries(() => this.exclusive(() => this.holding(() => super.transaction(options, fn))));
  }

  private insideWrite(): boolean {
    return this.inside.getStore()?.open === true;
  }

  private async holding<T>(work: () => Promise<T>): Promise<T> {
    const token = { open: true };
    try {
      return await this.inside.run(token, work);
    } finally {
      token.open = false;
    }
  }

  private async withRetries<T>(work: () => Promise<T>): Promise<T> {
    for (let attempt = 1; ; attempt++) {
      try {
        return await work();
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
