import type { RequestHandler } from 'express';
import { can, type Permission, type Role } from '../../shared/auth/permissions';
import { AppError } from '../errors';

export type Access = Permission | 'signed-in' | 'public';

export interface SessionUser {
  id: number;
  email: string;
  name: string;
  role: Role;
  /** Signed in with an administrator's temporary password: only their own account is open until they choose one. */
  mustChangePassword?: boolean;
}

declare global {
  namespace Express {
    // eslint-disable-next-line @typescript-eslint/no-empty-object-type
    interface User extends SessionUser {}
  }
}

export function requireAccess(access: Access): RequestHandler {
  return (req, _res, next) => {
    if (access === 'public') return next();
    if (!req.user) return next(AppError.unauthenticated());
    if (access === 'signed-in') return next();
    if (req.user.mustChangePassword) {
      return next(new AppError(403, 'password_change_required', 'Choose your own password first (Account page); the temporary one only opens your account.'));
    }
    if (can(req.user.role, access)) return next();
    next(AppError.forbidden(`Your role (${req.user.role}) does not allow this: it needs "${access}".`));
  };
}

export function currentUser(req: Express.Request): SessionUser {
  if (!req.user) throw AppError.unauthenticated();
  return req.user;
}
