import { QueryTypes, type Sequelize } from 'sequelize';
import type { ClientRateLimitInfo, Options, Store } from 'express-rate-limit';

/**
 * An express-rate-limit store that counts in the
 * `rate_limit_hits` table, so every instance on one PostgreSQL database sees
 * the same counts. Each increment is one atomic upsert that also starts a
 * new window when the old one has ended; the database clock decides, so
 * instances whose clocks differ still agree.
 */
export class SharedLimitStore implements Store {
  readonly localKeys = false;
  private windowMs = 60_000;
  private lastSweep = 0;

  constructor(
    private readonly sequelize: Sequelize,
    readonly prefix: string,
  ) {}

  init(options: Options) {
    this.windowMs = options.windowMs;
  }

  private key(key: string) {
    return `${this.prefix}${key}`.slice(0, 300);
  }

  async get(key: string): Promise<ClientRateLimitInfo | undefined> {
    const rows = await this.sequelize.query<{ hits: number; reset_at: Date }>('SELECT hits, reset_at FROM rate_limit_hits WHERE key = :key AND reset_at > now()', {
      replacements: { key: this.key(key) },
      type: QueryTypes.SELECT,
    });
    return rows[0] ? { totalHits: Number(rows[0].hits), resetTime: new Date(rows[0].reset_at) } : undefined;
  }

  async increment(key: string): Promise<ClientRateLimitInfo> {
    await this.sweep();
    const rows = await this.sequelize.query<{ hits: number; reset_at: Date }>(
      `INSERT INTO rate_limit_hits (key, hits, reset_at) VALUES (:key, 1, now() + make_interval(secs => :seconds))
       ON CONFLICT (key) DO UPDATE SET
         hits = CASE WHEN rate_limit_hits.reset_at <= now() THEN 1 ELSE rate_limit_hits.hits + 1 END,
         reset_at = CASE WHEN rate_limit_hits.reset_at <= now() THEN EXCLUDED.reset_at ELSE rate_limit_hits.reset_at END
       RETURNING hits, reset_at`,
      { replacements: { key: this.key(key), seconds: this.windowMs / 1000 }, type: QueryTypes.SELECT },
    );
    return { totalHits: Number(rows[0].hits), resetTime: new Date(rows[0].reset_at) };
  }

  async decrement(key: string) {
    await this.sequelize.query('UPDATE rate_limit_hits SET hits = GREATEST(hits - 1, 0) WHERE key = :key AND reset_at > now()', {
      replacements: { key: this.key(key) },
    });
  }

  async resetKey(key: string) {
    await this.sequelize.query('DELETE FROM rate_limit_hits WHERE key = :key', { replacements: { key: this.key(key) } });
  }

  /** Ended windows are removed now and then (at most once a minute per store), so the table stays small. */
  private async sweep() {
    const now = Date.now();
    if (now - this.lastSweep < 60_000) return;
    this.lastSweep = now;
    await this.sequelize.query(`DELETE FROM rate_limit_hits WHERE key LIKE :prefix AND reset_at < now() - interval '1 minute'`, {
      replacements: { prefix: `${this.prefix.replace(/[\\%_]/g, '\\$&')}%` },
    });
  }
}

/** A shared store on PostgreSQL; undefined (each limiter's own memory store) on SQLite, where there is one instance. */
export function limitStore(sequelize: Sequelize, prefix: string): SharedLimitStore | undefined {
  return sequelize.getDialect() === 'postgres' ? new SharedLimitStore(sequelize, prefix) : undefined;
}
