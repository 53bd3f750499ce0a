import { Router, type RequestHandler } from 'express';
import type { Permission } from '../../shared/auth/permissions';
import { requireAccess, type Access } from '../auth/guards';

export type Method = 'get' | 'post' | 'put' | 'patch' | 'delete';

export interface RouteRecord {
  method: Method;
  path: string;
  access: Access;
}

/**
 * The only way to add an API route: every route states who may call it
 * (a permission, 'signed-in' or 'public'), and the guard runs first.
 * The route matrix test reads `routes` and also walks Express's own stack,
 * so a route added behind this helper's back fails the suite.
 */
export class ApiRouter {
  readonly router = Router();
  readonly routes: RouteRecord[] = [];

  constructor(readonly prefix: string) {}

  private add(method: Method, path: string, access: Access, handlers: RequestHandler[]) {
    this.routes.push({ method, path: this.prefix + (path === '/' ? '' : path), access });
    this.router[method](path, requireAccess(access), ...handlers);
    return this;
  }
  get(path: string, access: Access, ...handlers: RequestHandler[]) {
    return this.add('get', path, access, handlers);
  }
  post(path: string, access: Access, ...handlers: RequestHandler[]) {
    return this.add('post', path, access, handlers);
  }
  put(path: string, access: Access, ...handlers: RequestHandler[]) {
    return this.add('put', path, access, handlers);
  }
  patch(path: string, access: Access, ...handlers: RequestHandler[]) {
    return this.add('patch', path, access, handlers);
  }
  delete(path: string, access: Access, ...handlers: RequestHandler[]) {
    return this.add('delete', path, access, handlers);
  }
}

export type { Permission };

/** Wrap an async handler so a rejected promise reaches the error handler (Express 5 does this too; kept explicit for clarity of types). */
export function handle<T>(fn: (req: Parameters<RequestHandler>[0], res: Parameters<RequestHandler>[1]) => Promise<T> | T): RequestHandler {
  return async (req, res, next) => {
    try {
      const result = await fn(req, res);
      if (!res.headersSent && result !== undefined) res.json(result);
    } catch (err) {
      next(err);
    }
  };
}
