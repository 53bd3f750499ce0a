import type { RequestHandler } from 'express';
import session from 'express-session';
import connectSessionSequelize from 'connect-session-sequelize';
import type { Sequelize } from 'sequelize';
import type { AppConfig } from '../config';
import type { SecurityLog } from '../log';

export const SESSION_COOKIE = 'rholog.sid';
/** A session's idle clock is moved on at most this often, so reading pages does not write to the database on every request. */
export const TOUCH_EVERY_MS = 60_000;

declare module 'express-session' {
  interface SessionData {
    /** When the person signed in (ms since the epoch): the absolute lifetime counts from here. */
    signedInAt?: number;
    /** The last time the idle clock was moved on (ms since the epoch), at most once a minute. */
    lastSeenAt?: number;
    /** Browser and system at sign-in ("Firefox on Android"), shown on the account page's list of sessions. */
    device?: string;
    /** The address the sign-in came from. */
    address?: string;
    passport?: { user?: number };
  }
}

const SequelizeStore = connectSessionSequelize(session.Store);
type StoreCallback = (err?: unknown) => void;
type StoredSession = session.SessionData & { passport?: { user?: number } };

/**
 * The sessions read from the database by this process, as express-session holds them for a request: a session is
 * created (a row inserted) only at sign-in; one read from its row is only ever written back to that row.
 */
const readFromRow = new WeakSet<object>();

/**
 * The database store, except that it never brings an ended session back. A request that read its session before
 * the session was ended elsewhere (a password change on another phone, an administrator's reset, a deactivation,
 * a sign-out) and changed it (the idle clock moves on once a minute) saves it when it finishes; the store's own
 * save would insert the row again, and the ended session would sign its holder in once more. Here the save of a
 * session read from its row updates that row only, and finds nothing to update once the row is gone.
 */
class SessionStore extends SequelizeStore {
  createSession(req: Parameters<session.Store['createSession']>[0], data: Parameters<session.Store['createSession']>[1]) {
    const s = super.createSession(req, data);
    readFromRow.add(s);
    return s;
  }

  set(sid: string, data: StoredSession, callback?: StoreCallback) {
    if (!readFromRow.has(data)) return super.set(sid, data, callback);
    const self = this as unknown as { sessionModel: { update: (v: object, o: object) => Promise<unknown> }; expiration: (d: StoredSession) => Date };
    const done = self.sessionModel.update(
      { data: JSON.stringify(data), expires: self.expiration(data), userId: data.passport?.user ?? null },
      { where: { sid } },
    );
    return done.then(
      () => callback?.(),
      (err: unknown) => callback?.(err),
    );
  }
}

/**
 * Sessions in the database (they survive a restart). A row is written only
 * when someone signs in (saveUninitialized off, and the CSRF token lives in a
 * cookie, not the session). The store's own touch is off: `sessionLifetime`
 * moves the idle clock at most once a minute, which saves the row and renews
 * the cookie.
 */
export function createSessionMiddleware(config: AppConfig, sequelize: Sequelize, secret: string) {
  // disableTouch is read by the store (connect-session-sequelize 7) but missing from its option types.
  const store = new SessionStore({
    disableTouch: true,
    db: sequelize,
    table: 'Session',
    expiration: config.session.idleMs,
    extendDefaultFields: (defaults: { data: string; expires: Date }, s: { passport?: { user?: number } }) => ({
      data: defaults.data,
      expires: defaults.expires,
      userId: s.passport?.user ?? null,
    }),
  } as ConstructorParameters<typeof SessionStore>[0]);
  const middleware = session({
    name: SESSION_COOKIE,
    secret,
    store,
    resave: false,
    saveUninitialized: false,
    rolling: false,
    cookie: {
      httpOnly: true,
      sameSite: 'lax',
      secure: config.cookieSecure,
      maxAge: config.session.idleMs,
    },
  });
  const stop = () => (store as unknown as { stopExpiringSessions: () => void }).stopExpiringSessions();
  return { middleware, stop };
}

/**
 * Ends a signed-in session that has been idle too long (SESSION_IDLE_HOURS)
 * or has lived too long whatever its use (SESSION_MAX_DAYS), and moves the
 * idle clock on at most once a minute. Runs after the session is loaded and
 * before passport reads the user from it.
 */
export function sessionLifetime(config: AppConfig, security: SecurityLog, now: () => number = Date.now): RequestHandler {
  return (req, res, next) => {
    const s = req.session;
    const userId = s?.passport?.user;
    if (!s || userId === undefined) return next();
    const t = now();
    // Sessions from before these clocks existed start theirs now.
    const signedInAt = s.signedInAt ?? (s.signedInAt = t);
    const lastSeenAt = s.lastSeenAt ?? (s.lastSeenAt = t);
    const tooOld = t - signedInAt > config.session.absoluteMs;
    const idle = t - lastSeenAt > config.session.idleMs;
    if (tooOld || idle) {
      security('session-expired', { userId, reason: tooOld ? 'absolute lifetime' : 'idle', ip: req.ip });
      // A fresh, empty session (not stored unless someone signs in) replaces the old one, whose row goes.
      s.regenerate((err) => {
        if (err) return next(err);
        res.clearCookie(SESSION_COOKIE, { path: '/' });
        next();
      });
      return;
    }
    if (t - lastSeenAt >= TOUCH_EVERY_MS) s.lastSeenAt = t;
    next();
  };
}
