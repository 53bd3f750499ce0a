import { csrfSync } from 'csrf-sync';

/** Synchroniser-token CSRF defence (OWASP CSRF Prevention Cheat Sheet): the token lives in the session, the client sends it in x-csrf-token. */
export function createCsrf() {
  return csrfSync({
    getTokenFromRequest: (req) => req.headers['x-csrf-token'] as string | undefined,
  });
}
export type Csrf = ReturnType<typeof createCsrf>;
