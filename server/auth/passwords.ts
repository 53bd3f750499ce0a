import { randomBytes, scrypt as scryptCb, timingSafeEqual, type ScryptOptions } from 'node:crypto';

// scrypt parameters: N = 2^15 by default, r = 8, p = 1 — the interactive-login
// level recommended in the OWASP Password Storage Cheat Sheet (common practice).
// N comes from the configuration (SCRYPT_COST): the tests run with a cheaper one.
// Each stored hash names its own parameters, so changing N never locks anyone out.
const R = 8;
const P = 1;
const KEY_LEN = 64;
let costN = 2 ** 15;
/** A hash of a random password, compared against when the e-mail is unknown, so timing does not tell. */
let dummyHash: Promise<string> | undefined;

/** Set once at start-up from the configuration (createApp, the admin command). */
export function configurePasswordHashing(options: { cost: number }) {
  if (options.cost !== costN) dummyHash = undefined;
  costN = options.cost;
}

function scrypt(password: string, salt: Buffer, n: number, r: number, p: number): Promise<Buffer> {
  const options: ScryptOptions = { N: n, r, p, maxmem: 128 * n * r * 2 };
  return new Promise((resolve, reject) =>
    scryptCb(password.normalize('NFKC'), salt, KEY_LEN, options, (err, key) => (err ? reject(err) : resolve(key))),
  );
}

export async function hashPassword(password: string): Promise<string> {
  const salt = randomBytes(16);
  const key = await scrypt(password, salt, costN, R, P);
  return `scrypt$${costN}$${R}$${P}$${salt.toString('base64')}$${key.toString('base64')}`;
}

export async function verifyPassword(password: string, stored: string): Promise<boolean> {
  const parts = stored.split('$');
  if (parts.length !== 6 || parts[0] !== 'scrypt') return false;
  const [, n, r, p, salt, key] = parts;
  // A stored hash outside sane bounds is refused rather than allowed to exhaust memory.
  if (!/^\d+$/.test(n) || Number(n) > 2 ** 20 || Number(r) > 32 || Number(p) > 16) return false;
  const expected = Buffer.from(key, 'base64');
  const actual = await scrypt(password, Buffer.from(salt, 'base64'), Number(n), Number(r), Number(p));
  return actual.length === expected.length && timingSafeEqual(actual, expected);
}

export function dummyPasswordHash() {
  dummyHash ??= hashPassword(randomBytes(12).toString('hex'));
  return dummyHash;
}

export function temporaryPassword(): string {
  // 12 characters from an alphabet without look-alikes (0/O, 1/l/I).
  const alphabet = 'abcdefghjkmnpqrstuvwxyzABCDEFGHJKMNPQRSTUVWXYZ23456789';
  const bytes = randomBytes(12);
  return Array.from(bytes, (b) => alphabet[b % alphabet.length]).join('');
}
