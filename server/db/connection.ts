import fs from 'node:fs';
import path from 'node:path';
import sqlite3 from 'sqlite3';
import type { Sequelize } from 'sequelize';
import { WriteQueuedSequelize } from './transactions';

export type Dialect = 'sqlite' | 'postgres';

/** How long an SQLite statement waits for another process's write lock before SQLITE_BUSY, unless the config says otherwise. */
export const SQLITE_BUSY_TIMEOUT_MS = 10_000;

export function dialectOf(databaseUrl: string): Dialect {
  return databaseUrl.startsWith('sqlite:') ? 'sqlite' : 'postgres';
}

/** `sqlite:relative/or/absolute.sqlite` or `sqlite:///abs/path` → a file path. */
export function sqlitePath(databaseUrl: string): string {
  const rest = databaseUrl.slice('sqlite:'.length).replace(/^\/\/(?=\/)/, '');
  return path.resolve(rest);
}

type OpenCallback = (err: Error | null) => void;

/**
 * sqlite3 as Sequelize loads it, except that every connection it opens gets
 * the busy timeout and synchronous=NORMAL before its first query. Sequelize's
 * SQLite dialect opens a fresh connection for each transaction, so PRAGMAs run
 * once on the default connection would not reach those.
 */
function sqliteWithConnectionPragmas(busyTimeoutMs: number) {
  const Database = function (filename: string, mode: number, callback?: OpenCallback) {
    const db = new sqlite3.Database(filename, mode, (err) => {
      if (err) return callback?.(err);
      db.configure('busyTimeout', busyTimeoutMs);
      db.exec('PRAGMA synchronous = NORMAL;', (e) => callback?.(e ?? null));
    });
    return db;
  } as unknown as typeof sqlite3.Database;
  return { ...sqlite3, Database };
}

export async function connect(databaseUrl: string, options: { sqliteBusyTimeoutMs?: number } = {}): Promise<Sequelize> {
  if (dialectOf(databaseUrl) === 'sqlite') {
    const storage = sqlitePath(databaseUrl);
    fs.mkdirSync(path.dirname(storage), { recursive: true });
    const sequelize = new WriteQueuedSequelize('single-writer', {
      dialect: 'sqlite',
      dialectModule: sqliteWithConnectionPragmas(options.sqliteBusyTimeoutMs ?? SQLITE_BUSY_TIMEOUT_MS),
      storage,
      logging: false,
      transactionType: 'IMMEDIATE' as never,
    });
    await sequelize.query('PRAGMA journal_mode = WAL;');
    await sequelize.query('PRAGMA foreign_keys = ON;');
    return sequelize;
  }
  const sequelize = new WriteQueuedSequelize('pool', databaseUrl, { dialect: 'postgres', logging: false, pool: { max: 5 } });
  await sequelize.authenticate();
  return sequelize;
}
