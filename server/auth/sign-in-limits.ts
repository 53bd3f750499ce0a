import type { Request, RequestHandler } from 'express';
import { ipKeyGenerator, rateLimit, type Store } from 'express-rate-limit';
import { slowDown } from 'express-slow-down';
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

const accountOf = (req: Request) => String((req.body as { email?: unknown } | undefined)?.email ?? '').trim().toLowerCase();
const addressOf = (req: Request) => ipKeyGenerator(req.ip ?? '');

function refuse(security: SecurityLog, scope: 'address' | 'account-and-address', message: string): RequestHandler {
  return (req, res) => {
    security('sign-in-limited', { scope, email: accountOf(req), ip: req.ip });
    res.status(429).json({ error: { code: 'too_many_attempts', message } });
  };
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
 * Only failures count: a crew signing in all morning from one depot address is never held up.
 */
export function signInLimits(limits: LoginLimits, security: SecurityLog, storeFor: (prefix: string) => Store | undefined = () => undefined): RequestHandler[] {
  const store = (prefix: string) => {
    const s = storeFor(prefix);
    return s ? { store: s } : {};
  };
  const minutes = Math.max(1, Math.round(limits.windowMs / 60_000));
  const wait = `Wait ${minutes} minute${minutes === 1 ? '' : 's'} and try again.`;
  const perAddress = rateLimit({
    windowMs: limits.windowMs,
    limit: limits.maxPerAddress,
    skipSuccessfulRequests: true,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    keyGenerator: (req) => `addr:${addressOf(req)}`,
    ...store('signin-address:'),
    handler: refuse(security, 'address', `Too many failed sign-ins from this address. ${wait}`),
  });
  const perPair = rateLimit({
    windowMs: limits.windowMs,
    limit: limits.maxPerPair,
    skipSuccessfulRequests: true,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    keyGenerator: (req) => `pair:${accountOf(req)}|${addressOf(req)}`,
    ...store('signin-pair:'),
    handler: refuse(security, 'account-and-address', `Too many failed sign-ins for this account from this address. ${wait}`),
  });
  const perAccount = slowDown({
    windowMs: limits.windowMs,
    delayAfter: limits.slowAfter,
    skipSuccessfulRequests: true,
    keyGenerator: (req) => `acct:${accountOf(req)}`,
    ...store('signin-account:'),
    // `used` counts this try too: the failures before it are one fewer.
    delayMs: (used: number, req: Request) => {
      const delayMs = signInDelayMs(used - 1, limits);
      if (delayMs > 0) security('sign-in-slowed', { email: accountOf(req), ip: req.ip, failures: used - 1, delayMs });
      return delayMs;
    },
    maxDelayMs: limits.maxDelayMs,
  });
  return [perAddress, perPair, perAccount];
}
