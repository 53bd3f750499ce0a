/**
 * What a signed-in person sees of one of their own sessions (`GET /api/auth/sessions`): never the
 * session id itself, which signs its holder in.
 */
export interface OwnSession {
  /** A stand-in for the session id (a hash of it), good for ending the session and nothing else. */
  id: string;
  signedInAt: string | null;
  lastSeenAt: string | null;
  /** Browser and system, read from the User-Agent at sign-in ("Firefox on Android"), or null. */
  device: string | null;
  /** The address the sign-in came from. */
  address: string | null;
  current: boolean;
}
