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

/** The account's sessions still in force, newest sign-in first. */
async function liveSessions(userId: number, absoluteMs: number) {
  const rows = await Session.findAll({ where: { userId, expires: { [Op.gt]: new Date() } } });
  const now = Date.now();
  return rows
    .map((row) => ({ row, data: parse(row.data), created: (row.get('createdAt') as Date | undefined)?.getTime() ?? 0 }))
    .filter((s) => s.data.signedInAt === undefined || now - s.data.signedInAt <= absoluteMs)
    .sort(
      (a, b) =>
        (b.data.signedInAt ?? b.created) - (a.data.signedInAt ?? a.created) ||
        b.created - a.created ||
        (a.row.sid < b.row.sid ? 1 : -1),
    );
}

/**
 * After a sign-in: the account keeps at most `max` sessions, the one just opened and the newest others; the
 * oldest are ended (their rows go, so their holders are signed out at their next request). Returns how many ended.
 */
export async function capSessions(sequelize: Sequelize, userId: number, currentSid: string, max: number): Promise<number> {
  const rows = await Session.findAll({ where: { userId }, attributes: ['sid', 'data', 'createdAt'] });
  const others = rows
    .filter((r) => r.sid !== currentSid)
    .map((r) => ({ sid: r.sid, at: parse(r.data).signedInAt ?? (r.get('createdAt') as Date | undefined)?.getTime() ?? 0 }))
    .sort((a, b) => b.at - a.at || (a.sid < b.sid ? 1 : -1));
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
