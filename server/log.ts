import { AsyncLocalStorage } from 'node:async_hooks';
import { randomUUID } from 'node:crypto';
import type { RequestHandler } from 'express';
import pino, { type DestinationStream, type Logger } from 'pino';
import type { AppConfig } from './config';

export type { Logger };

/**
 * Events an administrator or an auditor looks for after the fact. Each is one
 * JSON line with `security` set to the event's name, the account concerned
 * (`userId` or `email`), the client address (`ip`) where there is a request,
 * and who did it (`actorId`) where that is someone else.
 */
export type SecurityEvent =
  | 'sign-in-failed'
  | 'sign-in-limited'
  | 'sign-in-slowed'
  | 'password-changed'
  | 'password-change-failed'
  | 'password-change-limited'
  | 'password-reset'
  | 'role-changed'
  | 'user-deactivated'
  | 'user-reactivated'
  | 'admin-created'
  | 'calibration-own-accepted'
  | 'finding-reversed'
  | 'session-expired'
  | 'sessions-ended-over-cap'
  | 'session-ended-by-owner';

/** Failures and refusals are warnings; changes made on purpose are information. */
const WARNINGS: ReadonlySet<SecurityEvent> = new Set([
  'sign-in-failed',
  'sign-in-limited',
  'sign-in-slowed',
  'password-change-failed',
  'password-change-limited',
  'calibration-own-accepted',
]);

export type SecurityLog = (event: SecurityEvent, fields?: Record<string, unknown>) => void;

/** One JSON line per entry on standard output (or the given stream); passwords and cookies never written. */
export function createLogger(config: Pick<AppConfig, 'logLevel'>, destination?: DestinationStream): Logger {
  return pino(
    {
      level: config.logLevel,
      base: { app: 'rholog' },
      // Every line written while a request is handled names it, across instances behind one proxy;
      // every line written by a background job's run names that run instead.
      mixin: () => requestContext.getStore() ?? {},
      redact: { paths: ['password', 'newPassword', 'currentPassword', '*.password', 'headers.cookie', 'req.headers.cookie'], censor: '[hidden]' },
    },
    destination ?? pino.destination({ dest: 1, sync: true }),
  );
}

const requestContext = new AsyncLocalStorage<{ requestId: string } | { job: string; jobId: string; jobRunId: string }>();

/**
 * Run one try of a background job with its own ids on every log line it
 * writes (the job's name, its id, and an id for this run), never the id of
 * the request that happened to queue or wake it.
 */
export function runAsJob<T>(ids: { job: string; jobId: string; jobRunId: string }, fn: () => T): T {
  return requestContext.run(ids, fn);
}

/** A proxy's X-Request-Id when it looks like one (so one id follows a request through proxy and app logs), or a new one. */
const REQUEST_ID = /^[\w.:-]{8,128}$/;

/** Give each request an id: answered in X-Request-Id and written on every log line made while handling it. */
export const requestIds: RequestHandler = (req, res, next) => {
  const given = req.get('x-request-id');
  const id = given && REQUEST_ID.test(given) ? given : randomUUID();
  res.setHeader('X-Request-Id', id);
  requestContext.run({ requestId: id }, next);
};

export function securityLog(logger: Logger): SecurityLog {
  return (event, fields = {}) => {
    const entry = { security: event, ...fields };
    if (WARNINGS.has(event)) logger.warn(entry, `security: ${event}`);
    else logger.info(entry, `security: ${event}`);
  };
}
