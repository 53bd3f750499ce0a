import sqlite3 from 'sqlite3';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { sqlitePath } from '../../server/db/connection';
import { Site } from '../../server/db/models';
import { startApi, type Client, type TestApi } from './support/api';

/**
 * Another process holding SQLite's write lock (a backup, a second server on
 * the same file): Rholog retries a few times, then answers 503 with a clear
 * message and changes nothing, never a 500; once the lock is gone the same
 * request goes through. SQLite only: the lock is SQLite's.
 */
const onSqlite = !/^postgres(ql)?:\/\//.test(process.env.DATABASE_URL ?? '');

const run = (db: sqlite3.Database, sql: string) => new Promise<void>((resolve, reject) => db.exec(sql, (err) => (err ? reject(err) : resolve())));

describe.runIf(onSqlite)('a database locked by another process', () => {
  let api: TestApi;
  let sup: Client;
  let other: sqlite3.Database;
  beforeAll(async () => {
    // A short wait for the other process's lock, so the retries run out quickly.
    api = await startApi({ sqliteBusyTimeoutMs: 20 });
    sup = await api.as('supervisor');
    other = await new Promise<sqlite3.Database>((resolve, reject) => {
      const db = new sqlite3.Database(sqlitePath(api.app.ctx.config.databaseUrl), (err) => (err ? reject(err) : resolve(db)));
    });
  });
  afterAll(async () => {
    await new Promise((resolve) => other?.close(resolve));
    await api?.close();
  });

  it('answers 503 database_busy while the lock is held, stores nothing, and stores the site once it is released', async () => {
    const before = await Site.count();
    await run(other, 'BEGIN IMMEDIATE;');
    try {
      const res = await sup.post('/api/sites', { name: 'Weir pumping station', address: null, latitude: null, longitude: null, accessNotes: null }).expect(503);
      expect(res.body.error.code).toBe('database_busy');
      expect(res.body.error.message).toBe('The database is busy with other changes and this one could not be saved. Nothing was changed; try again in a moment.');
      expect(res.headers['retry-after']).toBe('2');
      expect(await Site.count()).toBe(before);
    } finally {
      await run(other, 'ROLLBACK;');
    }
    const ok = await sup.post('/api/sites', { name: 'Weir pumping station', address: null, latitude: null, longitude: null, accessNotes: null }).expect(201);
    expect(ok.body.name).toBe('Weir pumping station');
    expect(await Site.count({ where: { name: 'Weir pumping station' } })).toBe(1);
  });
});
