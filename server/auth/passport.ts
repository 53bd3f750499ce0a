import passport, { PassportStatic } from 'passport';
import { Strategy as LocalStrategy } from 'passport-local';
import { User } from '../db/models';
import { dummyPasswordHash, verifyPassword } from './passwords';
import type { SessionUser } from './guards';

export const WRONG_CREDENTIALS = 'The e-mail address or password is not right.';

/** Why a sign-in failed, for the security log only: the person is told the same thing either way. */
interface Refusal {
  message: string;
  reason: 'unknown account' | 'wrong password' | 'deactivated';
}
const refusal = (reason: Refusal['reason'], message = WRONG_CREDENTIALS): Refusal => ({ message, reason });

export function toSessionUser(user: User): SessionUser {
  return { id: user.id, email: user.email, name: user.name, role: user.role, mustChangePassword: user.mustChangePassword };
}

export function configurePassport(): PassportStatic {
  const instance = new passport.Passport() as unknown as PassportStatic;
  instance.use(
    new LocalStrategy({ usernameField: 'email', passwordField: 'password' }, async (email, password, done) => {
      try {
        const user = await User.findOne({ where: { email: email.trim().toLowerCase() } });
        if (!user) {
          await verifyPassword(password, await dummyPasswordHash());
          return done(null, false, refusal('unknown account'));
        }
        const ok = await verifyPassword(password, user.passwordHash);
        if (!ok) return done(null, false, refusal('wrong password'));
        if (!user.active) return done(null, false, refusal('deactivated', 'This account has been deactivated. Ask an administrator.'));
        return done(null, toSessionUser(user));
      } catch (err) {
        return done(err);
      }
    }),
  );
  instance.serializeUser((user, done) => done(null, (user as SessionUser).id));
  instance.deserializeUser(async (id: number, done) => {
    try {
      const user = await User.findByPk(id);
      // A deactivated or deleted user's session no longer signs anyone in.
      done(null, user && user.active ? toSessionUser(user) : false);
    } catch (err) {
      done(err);
    }
  });
  return instance;
}
