import fs from 'node:fs';
import type { Server } from 'node:http';
import path from 'node:path';
import type { AppConfig } from './config';
import { dialectOf, sqlitePath } from './db/connection';
import type { Logger } from './log';

/** Remove every permission for other users (0755 → 0750, 0644 → 0640), and optionally the group's too. */
function tighten(file: string, mask: number) {
  try {
    const mode = fs.statSync(file).mode & 0o7777;
    if ((mode & mask) !== 0) fs.chmodSync(file, mode & ~mask);
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code !== 'ENOENT') throw err;
  }
}

/**
 * A folder Rholog may close to others: its own. A folder shared by everyone
 * (the sticky bit, as /tmp has) or owned by another user is left exactly as it
 * is: closing it would break every other program that uses it.
 */
function ownFolder(dir: string): boolean {
  try {
    const st = fs.statSync(dir);
    const uid = typeof process.getuid === 'function' ? process.getuid() : st.uid;
    return (st.mode & 0o1000) === 0 && st.uid === uid;
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code === 'ENOENT') return false;
    throw err;
  }
}

/**
 * The SQLite file (with its WAL and shared-memory files) readable by Rholog's
 * own user only (0600), and the folders holding it and the uploads closed to
 * other users (0750 at most). Uploads are written 0440 by the trace store.
 */
export function hardenFiles(config: Pick<AppConfig, 'databaseUrl' | 'uploadDir'>, logger?: Logger) {
  if (dialectOf(config.databaseUrl) === 'sqlite') {
    const db = sqlitePath(config.databaseUrl);
    for (const f of [db, `${db}-wal`, `${db}-shm`]) tighten(f, 0o077);
    const dir = path.dirname(db);
    if (ownFolder(dir)) tighten(dir, 0o007);
    else logger?.warn({ folder: dir }, 'the database sits in a folder shared with others; it is left open as it is: give Rholog a folder of its own');
  }
  if (ownFolder(config.uploadDir)) tighten(config.uploadDir, 0o007);
  else logger?.warn({ folder: config.uploadDir }, 'the upload folder is shared with others; it is left open as it is: give Rholog a folder of its own');
  logger?.debug({ uploadDir: config.uploadDir }, 'file permissions checked');
}

const LOOPBACK = /^(127\.\d+\.\d+\.\d+|::1|localhost)$/;

/** What to say at start about how exposed this server is. */
export function exposureWarnings(config: Pick<AppConfig, 'demoData' | 'host'>): string[] {
  if (!config.demoData) return [];
  const warnings = [
    'Demo data is on: the demo accounts and their password are published in the README. Set DEMO_DATA=off and create the first administrator with "npm run admin:create" for real use.',
  ];
  if (!LOOPBACK.test(config.host)) {
    warnings.push(`HOST=${config.host} makes the demo accounts reachable from other machines; while demo data is on, leave HOST unset (127.0.0.1).`);
  }
  return warnings;
}

/**
 * Node cuts a request that has not fully arrived after 5 minutes (its requestTimeout default), answering a bare
 * 408: a technician's 20 MB trace over a poor mobile link would fail that way on every try. The limit comes from
 * the configuration instead (sized to the largest upload); headers must still arrive within a minute, so a
 * client that never finishes its headers holds a connection no longer than before.
 */
export function applyRequestTimeouts(server: Pick<Server, 'requestTimeout' | 'headersTimeout'>, config: Pick<AppConfig, 'requestTimeoutMs'>): void {
  server.requestTimeout = config.requestTimeoutMs;
  server.headersTimeout = Math.min(60_000, config.requestTimeoutMs);
}
