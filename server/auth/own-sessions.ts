import { createHash } from 'node:crypto';
import { Op, type Sequelize } from 'sequelize';
import { Session } from '../db/models';
import type { OwnSession } from '../../shared/schemas/own-sessions';

export type { OwnSession };

interface StoredData {
  signedInAt?: number;
  lastSeenAt?: number;
  device?: string;
  address?: string;
}

export const sessionHandle = (sid: string) => createHash('sha256').update(`session:${sid}`).digest('hex').slice(0, 24);

/** A short name for the browser and system in a User-Agent, for the account page; null if neither is recognised. */
export function deviceOf(userAgent: string | undefined): string | null {
  const ua = (userAgent ?? '').slice(0, 512);
  const browser = /Edg(e|A|iOS)?\//.test(ua)
    ? 'Edge'
    : /Firefox\/|FxiOS\//.test(ua)
      ? 'Firefox'
      : /Chrome\/|CriOS\//.test(ua)
        ? 'Chrome'
        : /Safari\//.test(ua)
          ? 'Safari'
          : null;
  const system = /Android/.test(ua)
    ? 'Android'
    : /iPhone|iPod/.test(ua)
      ? 'iPhone'
      : /iPad/.test(ua)
        ? 'iPad'
        : /Windows/.test(ua)
          ? 'Windows'
          : /Mac OS X|Macintosh/.test(ua)
            ? 'macOS'
            : /Linux|X11/.test(ua)
              ? 'Linux'
              : null;
  if (browser && system) return `${browser} on ${system}`;
  return browser ?? system;
}

function parse(data: string): StoredData {
  try {
    return JSON.parse(data) as StoredData;
  } catch {
    return {};
  }
}

/** Newest sign-in first (a session from before sign-in times were kept counts from its row's creation), then newest row, then by id. */
function newestFirst<T extends { sid: string; data: StoredData; createdMs: number }>(sessions: T[]): T[] {
  const at = (s: T) => s.data.signedInAt ?? s.createdMs;
  return sessions.sort((a, b) => at(b) - at(a) || b.createdMs - a.createdMs || (a.sid < b.sid ? 1 : -1));
}

/**
 * The account's sessions still in force, newest sign-in first: not past their idle end (the row's `expires`)
 * nor their whole lifetime (`absoluteMs` from sign-in). What the account page lists and what the cap counts.
 */
async function liveSessions(userId: number, absoluteMs: number) {
  const rows = await Session.findAll({ where: { userId, expires: { [Op.gt]: new Date() } } });
  const now = Date.now();
  return newestFirst(
    rows
      .map((row) => ({ row, sid: row.sid, data: parse(row.data), createdMs: (row.get('createdAt') as Date | undefined)?.getTime() ?? 0 }))
      .filter((s) => s.data.signedInAt === undefined || now - s.data.signedInAt <= absoluteMs),
  );
}

/**
 * After a sign-in: the account keeps at most `max` sessions in force, the one just opened and the newest others;
 * the oldest are ended (their rows go, so their holders are signed out at their next request). A session that has
 * already ended (idle, or past its lifetime) takes no place. Returns how many were ended.
 */
export async function capSessions(sequelize: Sequelize, userId: number, currentSid: string, max: number, absoluteMs: number): Promise<number> {
  const others = (await liveSessions(userId, absoluteMs)).filter((s) => s.sid !== currentSid);
  const ending = others.slice(Math.max(0, max - 1)).map((s) => s.sid);
  if (!ending.length) return 0;
  return sequelize.transaction((transaction) => Session.destroy({ where: { userId, sid: ending }, transaction }));
}

export async function listOwnSessions(userId: number, currentSid: string, absoluteMs: number): Promise<OwnSession[]> {
  const iso = (ms: number | undefined) => (typeof ms === 'number' ? new Date(ms).toISOString() : null);
  return (await liveSessions(userId, absoluteMs)).map(({ row, data }) => ({
    id: sessionHandle(row.sid),
    signedInAt: iso(data.signedInAt),
    lastSeenAt: iso(data.lastSeenAt),
    device: typeof data.device === 'string' ? data.device : null,
    address: typeof data.address === 'string' ? data.address : null,
    current: row.sid === currentSid,
  }));
}

/** Ends one of the account's own sessions, found by its handle: 'ended', 'current' (that is the caller's own) or 'not-found'. */
export async function endOwnSession(
  sequelize: Sequelize,
  userId: number,
  currentSid: string,
  handle: string,
): Promise<'ended' | 'current' | 'not-found'> {
  const rows = await Session.findAll({ where: { userId }, attributes: ['sid'] });
  const match = rows.find((r) => sessionHandle(r.sid) === handle);
  if (!match) return 'not-found';
  if (match.sid === currentSid) return 'current';
  const ended = await sequelize.transaction((transaction) => Session.destroy({ where: { userId, sid: match.sid }, transaction }));
  return ended ? 'ended' : 'not-found';
}
