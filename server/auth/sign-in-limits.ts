import type { Request, RequestHandler, Response } from 'express';
import { Mutex, Semaphore } from 'async-mutex';
import { ipKeyGenerator, MemoryStore, type Options, type Store } from 'express-rate-limit';
import type { AppConfig } from '../config';
import type { SecurityLog } from '../log';

type LoginLimits = AppConfig['login'];

/**
 * The delay before answering a sign-in to an account that has had `failures`
 * failed tries in the window: none up to `slowAfter`, then `delayMs`, doubling
 * with each further failure, never more than `maxDelayMs`.
 */
export function signInDelayMs(failures: number, limits: Pick<LoginLimits, 'slowAfter' | 'delayMs' | 'maxDelayMs'>): number {
  const over = failures - limits.slowAfter;
  if (over < 0) return 0;
  return Math.min(limits.maxDelayMs, limits.delayMs * 2 ** Math.min(over, 30));
}

/** "Try again in 1 minute." (any wait up to a minute) / "… in 14 minutes." for a wait of `seconds`, rounded up. */
export function retryWords(seconds: number): string {
  const minutes = Math.max(1, Math.ceil(seconds / 60));
  return `Try again in ${minutes} minute${minutes === 1 ? '' : 's'}.`;
}

/**
 * Sign-in tries from one address that are checked at the same time (in this process). Tries beyond it wait their
 * turn, they are not refused; it bounds how far a burst of wrong passwords sent together can overshoot the address
 * limit (by at most this many less one) while a crew signing in together is hardly held up.
 */
export const ADDRESS_TRIES_AT_ONCE = 4;

const accountOf = (req: Request) =>
  String((req.body as { email?: unknown } | undefined)?.email ?? '')
    .trim()
    .toLowerCase();
const addressOf = (req: Request) => ipKeyGenerator(req.ip ?? '');

/** Per-key locks that are dropped again when nobody holds or waits for them, so the map stays as small as the traffic. */
class KeyedLocks<L extends Mutex | Semaphore> {
  private readonly held = new Map<string, { lock: L; users: number }>();
  constructor(private readonly make: () => L) {}
  async acquire(key: string): Promise<() => void> {
    let entry = this.held.get(key);
    if (!entry) this.held.set(key, (entry = { lock: this.make(), users: 0 }));
    entry.users++;
    // A Mutex hands back its release function, a Semaphore [value, release].
    const got = (await entry.lock.acquire()) as (() => void) | [number, () => void];
    const release = typeof got === 'function' ? got : got[1];
    const e = entry;
    let done = false;
    return () => {
      if (done) return;
      done = true;
      release();
      if (--e.users === 0 && this.held.get(key) === e) this.held.delete(key);
    };
  }
}

/** A failure counter over `windowMs`: the shared store given (several instances on one database), or this process's own. */
function failureCounter(store: Store | undefined, windowMs: number): Store {
  const counter = store ?? new MemoryStore();
  counter.init?.({ windowMs } as Options);
  return counter;
}

/** The failures counted under `key` in the window still running, if any. */
async function failuresSoFar(store: Store, key: string) {
  const info = await store.get?.(key);
  return info && (!info.resetTime || info.resetTime.getTime() > Date.now()) ? info : undefined;
}

/** Seconds until a window ending at `resetTime` is over (the whole window when the store does not say), at least 1. */
const secondsUntil = (resetTime: Date | undefined, windowMs: number) =>
  Math.max(1, Math.ceil(((resetTime?.getTime() ?? Date.now() + windowMs) - Date.now()) / 1000));

/** Locals the sign-in route calls once it knows how the try ended (see `signInLimits`). */
export interface SignInOutcome {
  signInSettled?: (failed: boolean) => void;
}

/**
 * Limits on failed sign-ins that a stranger cannot turn against the account's
 * owner (OWASP Authentication Cheat Sheet, "Account Lockout": lock by what the
 * attacker controls, not by the account alone):
 *
 * - one address on one account: locked for the window after `maxPerPair` failures;
 * - one address on any accounts: refused for the window after `maxPerAddress` failures;
 * - one account from anywhere: never locked, only slowed down (a growing delay, capped),
 *   so the owner signing in from their own address still gets in while another address guesses.
 *
 * Only failures count, and only once they have happened: a try is checked against the failures so far, and counted
 * when its answer is known (a 4xx). Tries still under way count for nothing, so a crew signing in together from one
 * depot address is never told to wait. So that wrong passwords sent all at once cannot all slip past the check
 * before any of them is counted, tries on one account from one address go one after another (the pair limit is
 * exact), and at most `ADDRESS_TRIES_AT_ONCE` tries from one address are checked at once. With several instances on
 * one database these turns are per instance. A refusal is a 429 that says when to try again (`Retry-After` and
 * `retryAfterSeconds`).
 *
 * The route calls `res.locals.signInSettled(failed)` when it knows the outcome; an answer sent without it (a
 * malformed body) is counted by its status.
 */
export function signInLimits(
  limits: LoginLimits,
  security: SecurityLog,
  storeFor: (prefix: string) => Store | undefined = () => undefined,
  warn: (message: string, err: unknown) => void = () => {},
): RequestHandler[] {
  const counter = (prefix: string): Store => failureCounter(storeFor(prefix), limits.windowMs);
  const perAddress = counter('signin-address:');
  const perPair = counter('signin-pair:');
  const perAccount = counter('signin-account:');
  const pairTurns = new KeyedLocks(() => new Mutex());
  const addressTurns = new KeyedLocks(() => new Semaphore(ADDRESS_TRIES_AT_ONCE));

  const failures = failuresSoFar;

  const refuse = (req: Request, res: Response, scope: 'address' | 'account-and-address', what: string, resetTime: Date | undefined) => {
    const seconds = secondsUntil(resetTime, limits.windowMs);
    security('sign-in-limited', { scope, email: accountOf(req), ip: req.ip, retryAfterSeconds: seconds });
    res.setHeader('retry-after', String(seconds));
    res.status(429).json({ error: { code: 'too_many_attempts', message: `${what} ${retryWords(seconds)}`, retryAfterSeconds: seconds } });
  };

  const gate: RequestHandler = (req, res, next) => {
    const account = accountOf(req);
    const address = addressOf(req);
    const pairKey = `pair:${account}|${address}`;
    const addressKey = `addr:${address}`;
    const accountKey = `acct:${account}`;
    void (async () => {
      // Always the pair's turn first, then the address's: one order, so no two tries wait on each other.
      const releasePair = await pairTurns.acquire(pairKey);
      const releaseAddress = await addressTurns.acquire(addressKey);
      const release = () => {
        releaseAddress();
        releasePair();
      };
      try {
        const byAddress = await failures(perAddress, addressKey);
        if (byAddress && byAddress.totalHits >= limits.maxPerAddress) {
          release();
          return refuse(req, res, 'address', 'Too many failed sign-ins from this address.', byAddress.resetTime);
        }
        const byPair = await failures(perPair, pairKey);
        if (byPair && byPair.totalHits >= limits.maxPerPair) {
          release();
          return refuse(req, res, 'account-and-address', 'Too many failed sign-ins for this account from this address.', byPair.resetTime);
        }
        const byAccount = (await failures(perAccount, accountKey))?.totalHits ?? 0;
        const delayMs = signInDelayMs(byAccount, limits);
        if (delayMs > 0) {
          security('sign-in-slowed', { email: account, ip: req.ip, failures: byAccount, delayMs });
          await new Promise((resolve) => setTimeout(resolve, delayMs));
        }
      } catch (err) {
        release();
        return next(err);
      }

      let settled = false;
      const settle = (failed: boolean) => {
        if (settled) return;
        settled = true;
        const counted = failed ? Promise.all([perAddress.increment(addressKey), perPair.increment(pairKey), perAccount.increment(accountKey)]) : Promise.resolve();
        // The next try of this pair is checked only once this failure is counted.
        counted.then(release, (err: unknown) => {
          release();
          warn('a failed sign-in could not be counted', err);
        });
      };
      (res.locals as SignInOutcome).signInSettled = settle;
      res.on('finish', () => settle(res.statusCode >= 400 && res.statusCode < 500));
      // A visitor who hangs up does not keep the turn; their try is still counted when the route settles it.
      res.on('close', () => {
        if (!res.writableFinished) release();
      });
      next();
    })().catch(next);
  };
  return [gate];
}

/** Locals the change-password route sets when the current password it was given is wrong (see `passwordChangeLimit`). */
export interface PasswordChangeOutcome {
  wrongCurrentPassword?: boolean;
}

/**
 * Wrong current passwords on the change-password route, per account, counted as sign-in failures are: a try is
 * checked against the wrong ones so far and counted only once its answer says the current password was wrong
 * (`res.locals.wrongCurrentPassword`). A right password never counts, however many are sent at once or however
 * they end (a weak or unchanged new password); tries of one account take turns, so wrong ones sent all at once are
 * still held to `max`. After `max` wrong ones in the window, `refuse(seconds)` answers until it is over.
 */
export function passwordChangeLimit(opts: {
  max: number;
  windowMs: number;
  store?: Store;
  refuse: (req: Request, res: Response, retryAfterSeconds: number) => void;
  warn?: (message: string, err: unknown) => void;
}): RequestHandler {
  const wrong = failureCounter(opts.store, opts.windowMs);
  const turns = new KeyedLocks(() => new Mutex());
  return (req, res, next) => {
    const key = `pw:${req.user?.id ?? 0}`;
    void (async () => {
      const release = await turns.acquire(key);
      try {
        const so = await failuresSoFar(wrong, key);
        if (so && so.totalHits >= opts.max) {
          release();
          return opts.refuse(req, res, secondsUntil(so.resetTime, opts.windowMs));
        }
      } catch (err) {
        release();
        return next(err);
      }
      let settled = false;
      res.on('finish', () => {
        if (settled) return;
        settled = true;
        const counted = (res.locals as PasswordChangeOutcome).wrongCurrentPassword === true ? Promise.resolve(wrong.increment(key)) : Promise.resolve();
        // The account's next try is checked only once this one is counted.
        counted.then(release, (err: unknown) => {
          release();
          opts.warn?.('a wrong current password could not be counted', err);
        });
      });
      res.on('close', () => {
        if (!res.writableFinished) release();
      });
      next();
    })().catch(next);
  };
}
