import { Op } from 'sequelize';
import type { PassportStatic } from 'passport';
import { ChangePasswordSchema, LoginSchema, PreferencesSchema } from '../../shared/schemas/users';
import type { AppContext } from '../context';
import { DEMO_PASSWORD, DEMO_USERS } from '../db/demo/organisation';
import { Session, User } from '../db/models';
import { AppError } from '../errors';
import { ApiRouter, handle } from '../http/api-router';
import type { Csrf } from './csrf';
import { currentUser } from './guards';
import { assertStrongPassword } from './password-strength';
import { WRONG_CREDENTIALS } from './passport';
import { hashPassword, verifyPassword } from './passwords';
import { capSessions, deviceOf, endOwnSession, listOwnSessions } from './own-sessions';
import { limitStore } from './shared-limit-store';
import { passwordChangeLimit, signInLimits, type SignInOutcome } from './sign-in-limits';

export function authRoutes(ctx: AppContext, deps: { passport: PassportStatic; csrf: Csrf }) {
  const r = new ApiRouter('/api/auth');
  const { windowMs } = ctx.config.login;

  // Wrong current passwords on the change route, per account: someone at an
  // unlocked, signed-in screen cannot guess the password behind it. Only wrong ones count, once answered.
  const passwordGuesses = passwordChangeLimit({
    max: ctx.config.passwordChangeMaxFails,
    windowMs,
    store: ctx.sequelize.getDialect() === 'postgres' ? limitStore(ctx.sequelize, 'password-change:') : undefined,
    warn: (message, err) => ctx.logger.warn({ err }, message),
    refuse: (req, res, seconds) => {
      ctx.security('password-change-limited', { userId: req.user?.id, ip: req.ip, retryAfterSeconds: seconds });
      const wait = Math.max(1, Math.ceil(seconds / 60));
      res.setHeader('retry-after', String(seconds));
      res.status(429).json({
        error: {
          code: 'too_many_attempts',
          message: `Too many wrong current passwords. Wait ${wait} minute${wait === 1 ? '' : 's'} and try again, or ask an administrator for a new temporary password.`,
          retryAfterSeconds: seconds,
        },
      });
    },
  });

  r.get('/csrf', 'public', (req, res) => {
    res.json({ csrfToken: deps.csrf.token(req, res) });
  });

  // While the demo scenario is on (a loopback-only server unless told otherwise), the sign-in page lists its
  // accounts and their published password; the accounts still active are listed, nothing otherwise.
  r.get(
    '/demo',
    'public',
    handle(async () => {
      if (!ctx.config.demoData) return { demo: false };
      const active = await User.findAll({ where: { email: DEMO_USERS.map((u) => u.email), active: true }, attributes: ['email', 'role'] });
      const order = DEMO_USERS.map((u) => u.email as string);
      const accounts = active.map((u) => ({ email: u.email, role: u.role })).sort((a, b) => order.indexOf(a.email) - order.indexOf(b.email));
      return accounts.length ? { demo: true, password: DEMO_PASSWORD, accounts } : { demo: false };
    }),
  );

  const signInGate = signInLimits(
    ctx.config.login,
    ctx.security,
    (prefix) => limitStore(ctx.sequelize, prefix),
    (message, err) => ctx.logger.warn({ err }, message),
  );

  r.post('/login', 'public', ...signInGate, (req, res, next) => {
    req.body = LoginSchema.parse(req.body);
    const email = (req.body as { email: string }).email;
    deps.passport.authenticate('local', (err: unknown, user: Express.User | false, info?: { message?: string; reason?: string }) => {
      if (err) return next(err);
      const outcome = res.locals as SignInOutcome;
      if (!user) {
        outcome.signInSettled?.(true);
        ctx.security('sign-in-failed', { email, ip: req.ip, reason: info?.reason ?? 'wrong credentials' });
        res.status(401).json({ error: { code: 'wrong_credentials', message: info?.message ?? WRONG_CREDENTIALS } });
        return;
      }
      outcome.signInSettled?.(false);
      // passport 0.7 regenerates the session id on logIn (session fixation defence).
      req.logIn(user, (loginErr) => {
        if (loginErr) return next(loginErr);
        const now = Date.now();
        req.session.signedInAt = now;
        req.session.lastSeenAt = now;
        req.session.device = deviceOf(req.get('user-agent')) ?? undefined;
        req.session.address = req.ip;
        // The new session is stored before the account's oldest are ended beyond the cap, so it is counted as the newest.
        req.session.save((saveErr) => {
          if (saveErr) return next(saveErr);
          capSessions(ctx.sequelize, user.id, req.sessionID, ctx.config.sessionsPerUser, ctx.config.session.absoluteMs)
            .then((ended) => {
              if (ended) ctx.security('sessions-ended-over-cap', { userId: user.id, ip: req.ip, ended, cap: ctx.config.sessionsPerUser });
              return User.findByPk(user.id);
            })
            .then((u) => {
              res.json({ user: u!.toPublic(), csrfToken: deps.csrf.token(req, res, true) });
            })
            .catch(next);
        });
      });
    })(req, res, next);
  });

  r.post('/logout', 'public', (req, res, next) => {
    req.logout((err) => {
      if (err) return next(err);
      res.json({ ok: true, csrfToken: deps.csrf.token(req, res, true) });
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

  // The account's own sessions (browsers, phones): where it is signed in, and a way to end one left signed in elsewhere.
  r.get(
    '/sessions',
    'signed-in',
    handle(async (req) => ({
      sessions: await listOwnSessions(currentUser(req).id, req.sessionID, ctx.config.session.absoluteMs),
      cap: ctx.config.sessionsPerUser,
    })),
  );

  r.delete(
    '/sessions/:id',
    'signed-in',
    handle(async (req) => {
      const userId = currentUser(req).id;
      const outcome = await endOwnSession(ctx.sequelize, userId, req.sessionID, String(req.params.id));
      if (outcome === 'not-found') throw new AppError(404, 'not_found', 'That session has already ended.');
      if (outcome === 'current')
        throw new AppError(409, 'current_session', 'This is the session you are using: sign out to end it.');
      ctx.security('session-ended-by-owner', { userId, ip: req.ip });
      return { ok: true };
    }),
  );

  r.post(
    '/password',
    'signed-in',
    passwordGuesses,
    handle(async (req, res) => {
      const body = ChangePasswordSchema.parse(req.body);
      const user = await User.findByPk(currentUser(req).id);
      if (!user) throw AppError.unauthenticated();
      if (!(await verifyPassword(body.currentPassword, user.passwordHash))) {
        res.locals.wrongCurrentPassword = true;
        ctx.security('password-change-failed', { userId: user.id, ip: req.ip });
        throw AppError.badRequest('wrong_password', 'The current password is not right.', {
          fields: [{ field: 'currentPassword', message: 'is not right' }],
        });
      }
      if (body.newPassword === body.currentPassword) {
        throw AppError.badRequest('same_password', 'The new password must differ from the current one.', {
          fields: [{ field: 'newPassword', message: 'must differ from the current password' }],
        });
      }
      assertStrongPassword(body.newPassword, user);
      const passwordHash = await hashPassword(body.newPassword);
      // Every other session of the account ends with the old password; this one goes on.
      const done = await ctx.sequelize.transaction(async (transaction) => {
        // The password checked above must still be the one in force: an administrator's reset, or a change made on
        // another phone, while the new one was being hashed is not overwritten unseen.
        const now = await User.findByPk(user.id, { transaction, lock: transaction.LOCK.UPDATE });
        if (!now || now.passwordHash !== user.passwordHash) {
          throw new AppError(
            409,
            'password_changed_meanwhile',
            'Your password was changed or reset (on another device, or by an administrator) while this change was being made. Nothing was changed: sign in with the password now in force.',
          );
        }
        await now.update({ passwordHash, mustChangePassword: false }, { transaction });
        return { changed: now, ended: await Session.destroy({ where: { userId: user.id, sid: { [Op.ne]: req.sessionID } }, transaction }) };
      });
      ctx.security('password-changed', { userId: user.id, ip: req.ip, endedSessions: done.ended });
      return done.changed.toPublic();
    }),
  );

  return r;
}
