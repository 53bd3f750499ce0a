import { createHmac } from 'node:crypto';
import type { Request, Response } from 'express';
import { doubleCsrf } from 'csrf-csrf';

export const CSRF_COOKIE = 'rholog.csrf';
const SIGNED_OUT = 'signed-out';

/**
 * CSRF defence by a signed double-submit cookie (OWASP CSRF Prevention Cheat
 * Sheet, "Signed Double-Submit Cookie"): the token is an HMAC over the session
 * id and a random value; the same token travels in an httpOnly cookie and in
 * the x-csrf-token header, and the server checks both match and the HMAC.
 *
 * Nothing is stored on the server, so a signed-out visitor fetching a token
 * creates no session row. Before sign-in the token is bound to a fixed label
 * (it still defends the sign-in form); from sign-in on it is bound to the
 * session id, which is new at every sign-in, so a token from before is void.
 */
export function createCsrf(options: { sessionSecret: string; cookieSecure: 'auto' | boolean }) {
  const secret = createHmac('sha256', options.sessionSecret).update('rholog csrf').digest('hex');
  const csrf = doubleCsrf({
    getSecret: () => secret,
    getSessionIdentifier: (req) => (req.user ? req.sessionID : SIGNED_OUT),
    cookieName: CSRF_COOKIE,
    cookieOptions: { sameSite: 'lax', path: '/', httpOnly: true, secure: options.cookieSecure === true },
    getCsrfTokenFromRequest: (req) => req.headers['x-csrf-token'],
  });
  const secureFor = (req: Request) => (options.cookieSecure === 'auto' ? req.secure : options.cookieSecure);
  return {
    protection: csrf.doubleCsrfProtection,
    /** The token for this request's phase (signed in or not), reusing the cookie's when it is still valid. */
    token: (req: Request, res: Response, fresh = false) =>
      csrf.generateCsrfToken(req, res, { overwrite: fresh, cookieOptions: { secure: secureFor(req) } }),
  };
}
export type Csrf = ReturnType<typeof createCsrf>;
