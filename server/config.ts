import path from 'node:path';
import { z } from 'zod';

const onOff = z
  .enum(['on', 'off', 'true', 'false', '1', '0'], { error: 'must be on or off' })
  .transform((v) => v === 'on' || v === 'true' || v === '1');

const port = z.coerce
  .number({ error: 'must be a whole number from 0 to 65535' })
  .int('must be a whole number from 0 to 65535')
  .min(0, 'must be a whole number from 0 to 65535')
  .max(65535, 'must be a whole number from 0 to 65535');

const EnvSchema = z.object({
  NODE_ENV: z.enum(['development', 'production', 'test']).default('development'),
  PORT: port.default(3000),
  HOST: z.string().min(1).default('0.0.0.0'),
  DATABASE_URL: z
    .string()
    .regex(/^(sqlite:|postgres:\/\/|postgresql:\/\/)/, 'must start with sqlite: or postgres://')
    .default('sqlite:data/rholog.sqlite'),
  SESSION_SECRET: z.string().min(16, 'must be at least 16 characters').optional(),
  DEMO_DATA: onOff.default(true),
  PUBLIC_URL: z.url().optional(),
  SMTP_URL: z.string().regex(/^smtps?:\/\//, 'must start with smtp:// or smtps://').optional(),
  MAIL_FROM: z.string().min(3).default('Rholog <rholog@example.com>'),
  CAPTURE_SMTP_PORT: port.default(0),
  MAIL_RETRY_BASE_S: z.coerce.number({ error: 'must be a number of seconds' }).positive('must be more than 0').max(3600).default(30),
  MAIL_MAX_ATTEMPTS: z.coerce.number({ error: 'must be a whole number' }).int().min(1).max(50).default(8),
  UPLOAD_DIR: z.string().min(1).default('uploads'),
  MAX_UPLOAD_MB: z.coerce.number().positive().max(512).default(20),
  COOKIE_SECURE: z.enum(['auto', 'on', 'off']).default('auto'),
  TRUST_PROXY: onOff.default(false),
  LOGIN_MAX_PER_ACCOUNT: z.coerce.number().int().positive().default(5),
  LOGIN_MAX_PER_ADDRESS: z.coerce.number().int().positive().default(30),
  LOGIN_WINDOW_MIN: z.coerce.number().positive().default(15),
});

export type Env = z.input<typeof EnvSchema>;

export interface AppConfig {
  env: 'development' | 'production' | 'test';
  port: number;
  host: string;
  databaseUrl: string;
  /** Undefined means: generate one and keep it beside the SQLite file. */
  sessionSecret?: string;
  demoData: boolean;
  publicUrl?: string;
  smtpUrl?: string;
  mailFrom: string;
  captureSmtpPort: number;
  /** A failed send is retried after this long, then twice as long each time. */
  mailRetryBaseMs: number;
  mailMaxAttempts: number;
  uploadDir: string;
  maxUploadBytes: number;
  cookieSecure: 'auto' | boolean;
  trustProxy: boolean;
  login: { maxPerAccount: number; maxPerAddress: number; windowMs: number };
  /** Serve the built client from dist/client (production) or Vite in middleware mode (development). */
  client: 'static' | 'vite' | 'none';
}

export class ConfigError extends Error {}

/** Parse and validate the environment once; the rest of the server reads only AppConfig. */
export function loadConfig(env: Record<string, string | undefined> = process.env): AppConfig {
  const cleaned = Object.fromEntries(Object.entries(env).filter(([, v]) => v !== undefined && v !== ''));
  const parsed = EnvSchema.safeParse(cleaned);
  if (!parsed.success) {
    const lines = parsed.error.issues.map((i) => `  - ${i.path.join('.')}: ${i.message}`);
    throw new ConfigError(`Rholog cannot start: the configuration is not valid.\n${lines.join('\n')}`);
  }
  const e = parsed.data;
  return {
    env: e.NODE_ENV,
    port: e.PORT,
    host: e.HOST,
    databaseUrl: e.DATABASE_URL,
    sessionSecret: e.SESSION_SECRET,
    demoData: e.DEMO_DATA,
    publicUrl: e.PUBLIC_URL,
    smtpUrl: e.SMTP_URL,
    mailFrom: e.MAIL_FROM,
    captureSmtpPort: e.CAPTURE_SMTP_PORT,
    mailRetryBaseMs: Math.round(e.MAIL_RETRY_BASE_S * 1000),
    mailMaxAttempts: e.MAIL_MAX_ATTEMPTS,
    uploadDir: path.resolve(e.UPLOAD_DIR),
    maxUploadBytes: Math.round(e.MAX_UPLOAD_MB * 1024 * 1024),
    cookieSecure: e.COOKIE_SECURE === 'auto' ? 'auto' : e.COOKIE_SECURE === 'on',
    trustProxy: e.TRUST_PROXY,
    login: {
      maxPerAccount: e.LOGIN_MAX_PER_ACCOUNT,
      maxPerAddress: e.LOGIN_MAX_PER_ADDRESS,
      windowMs: Math.round(e.LOGIN_WINDOW_MIN * 60_000),
    },
    client: e.NODE_ENV === 'production' ? 'static' : e.NODE_ENV === 'development' ? 'vite' : 'none',
  };
}
