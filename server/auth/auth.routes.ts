import type { RequestHandler } from 'express';
import { rateLimit } from 'express-rate-limit';
import { ChangePasswordSchema, LoginSchema, PreferencesSchema } from '../../shared/schemas/users';
import type { AppContext } from '../context';
import { User } from '../db/models';
import { AppError } from '../errors';
import { ApiRouter, handle } from '../http/api-router';
import type { Csrf } from '../http/csrf';
import { currentUser } from './guards';
import { WRONG_CREDENTIALS } from './passport';
import { hashPassword, verifyPassword } from './passwords';
import type { PassportStatic } from 'passport';

function tooMany(message: string): RequestHandler {
  return (_req, res) => {
    res.status(429).json({ error: { code: 'too_many_attempts', message } });
  };
}

export function authRoutes(ctx: AppContext, deps: { passport: PassportStatic; csrf: Csrf }) {
  const r = new ApiRouter('/api/auth');
  const { windowMs, maxPerAccount, maxPerAddress } = ctx.config.login;
  const minutes = Math.round(windowMs / 60_000);

  // Failed tries only, both per address and per account: a crew behind one
  // depot address signing in all morning is not locked out, a guesser is.
  const perAddress = rateLimit({
    windowMs,
    limit: maxPerAddress,
    skipSuccessfulRequests: true,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    handler: tooMany(`Too many failed sign-ins from this address. Wait ${minutes} minutes and try again.`),
  });
  const perAccount = rateLimit({
    windowMs,
    limit: maxPerAccount,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    skipSuccessfulRequests: true,
    keyGenerator: (req) => `acct:${String(req.body?.email ?? '').trim().toLowerCase()}`,
    handler: tooMany(`Too many failed sign-ins for this account. Wait ${minutes} minutes and try again.`),
  });

  r.get('/csrf', 'public', (req, res) => {
    res.json({ csrfToken: deps.csrf.generateToken(req) });
  });

  r.post(
    '/login',
    'public',
    perAddress,
    perAccount,
    (req, res, next) => {
      req.body = LoginSchema.parse(req.body);
      deps.passport.authenticate('local', (err: unknown, user: Express.User | false, info?: { message?: string }) => {
        if (err) return next(err);
        if (!user) {
          res.status(401).json({ error: { code: 'wrong_credentials', message: info?.message ?? WRONG_CREDENTIALS } });
          return;
        }
        // passport 0.7 regenerates the session id on logIn (session fixation defence).
        req.logIn(user, (loginErr) => {
          if (loginErr) return next(loginErr);
          User.findByPk(user.id)
            .then((u) => {
              res.json({ user: u!.toPublic(), csrfToken: deps.csrf.generateToken(req, true) });
            })
            .catch(next);
        });
      })(req, res, next);
    },
  );

  r.post('/logout', 'public', (req, res, next) => {
    req.logout((err) => {
      if (err) return next(err);
      res.json({ ok: true, csrfToken: deps.csrf.generateToken(req, true) });
    });
  });

  r.get(
    '/me',
    'signed-in',
    handle(async (req) => {
      const user = await User.findByPk(currentUser(req).id);
      if (!user) throw AppError.unauthenticated();
      return user.toPublic();
    }),
  );

  r.patch(
    '/me',
    'signed-in',
    handle(async (req) => {
      const body = PreferencesSchema.parse(req.body);
      const user = await User.findByPk(currentUser(req).id);
      if (!user) throw AppError.unauthenticated();
      await user.update(body);
      return user.toPublic();
    }),
  );

  r.post(
    '/password',
    'signed-in',
    handle(async (req) => {
      const body = ChangePasswordSchema.parse(req.body);
      const user = await User.findByPk(currentUser(req).id);
      if (!user) throw AppError.unauthenticated();
      if (!(await verifyPassword(body.currentPassword, user.passwordHash))) {
        throw AppError.badRequest('wrong_password', 'The current password is not right.', {
          fields: [{ field: 'currentPassword', message: 'is not right' }],
        });
      }
      await user.update({ passwordHash: await hashPassword(body.newPassword), mustChangePassword: false });
      return user.toPublic();
    }),
  );

  return r;
}
