import os from 'node:os';
import path from 'node:path';
import { z } from 'zod';

const onOff = z
  .enum(['on', 'off', 'true', 'false', '1', '0'], { error: 'must be on or off' })
  .transform((v) => v === 'on' || v === 'true' || v === '1');

/** How many reverse proxies stand in front: a hop count (0 = none). 'on' is one proxy, 'off' none. */
const proxyHops = z
  .string()
  .regex(/^(on|off|true|false|\d{1,2})$/, { error: 'must be a number of proxies in front (0, 1, 2…) or on/off' })
  .transform((v) => (v === 'on' || v === 'true' ? 1 : v === 'off' || v === 'false' ? 0 : Number(v)));

const port = z.coerce
  .number({ error: 'must be a whole number from 0 to 65535' })
  .int('must be a whole number from 0 to 65535')
  .min(0, 'must be a whole number from 0 to 65535')
  .max(65535, 'must be a whole number from 0 to 65535');

const EnvSchema = z.object({
  // Production unless asked otherwise: development (Vite, detailed errors) only when NODE_ENV says so.
  NODE_ENV: z.enum(['development', 'production', 'test']).default('production'),
  PORT: port.default(3000),
  /** Unset: 127.0.0.1 while the demo data (with its published passwords) is on, else 0.0.0.0. */
  HOST: z.string().min(1).optional(),
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
  /** Worker threads that analyse uploads; unset: one fewer than the cores (at least 1, at most 8). */
  ANALYSIS_THREADS: z.coerce.number({ error: 'must be a whole number from 1 to 32' }).int().min(1).max(32).optional(),
  ANALYSIS_TIMEOUT_S: z.coerce.number({ error: 'must be a number of seconds' }).min(0).max(600).default(20),
  ANALYSIS_MEMORY_MB: z.coerce.number({ error: 'must be a number of megabytes' }).int().min(16).max(8192).default(256),
  /**
   * Files up to this size (KiB) are analysed inside the upload request; larger ones are stored at once as
   * "pending" and analysed by a background job. 4096 KiB holds about 200,000 samples at about 20 bytes a row.
   */
  ANALYSIS_INLINE_MAX_KB: z.coerce.number({ error: 'must be a whole number of KiB' }).int().min(1).max(524_288).default(4096),
  /**
   * How many large files (over ANALYSIS_INLINE_MAX_KB) one person may have waiting for their background analysis at
   * once: the background lane has one thread, so one account's queue of hundreds would hold everyone else's for hours.
   */
  /**
   * How many uploads one person may have arriving or being analysed at once, per instance: each holds a
   * connection, up to MAX_UPLOAD_MB × 10 files of the inbox's disk, and its small files' analyses.
   */
  UPLOADS_AT_ONCE_PER_USER: z.coerce.number({ error: 'must be a whole number' }).int('must be a whole number').min(1).max(1000).default(4),
  ANALYSIS_PENDING_PER_USER: z.coerce.number({ error: 'must be a whole number' }).int('must be a whole number').min(1).max(10_000).default(20),
  /** Start-up clean-up leaves files younger than this alone (an upload may be arriving). */
  /** How long an SQLite statement waits for another process's write lock (this process queues its own writes). */
  SQLITE_BUSY_TIMEOUT_MS: z.coerce.number({ error: 'must be a number of milliseconds' }).int().min(0).max(600_000).default(10_000),
  /**
   * How long one request may take from its first byte to its last, the upload of a trace file included. Unset:
   * long enough for the largest file over a poor mobile link (MAX_UPLOAD_MB at 32 KiB/s), at least 5 minutes.
   */
  REQUEST_TIMEOUT_S: z.coerce.number({ error: 'must be a whole number of seconds' }).int('must be a whole number of seconds').min(10).max(86_400).optional(),
  UPLOAD_SWEEP_MIN_AGE_S: z.coerce.number({ error: 'must be a number of seconds' }).min(0).max(86_400).default(600),
  COOKIE_SECURE: z.enum(['auto', 'on', 'off']).default('auto'),
  TRUST_PROXY: proxyHops.default(0),
  LOGIN_MAX_PER_PAIR: z.coerce.number().int().positive().default(5),
  LOGIN_MAX_PER_ADDRESS: z.coerce.number().int().positive().default(30),
  LOGIN_WINDOW_MIN: z.coerce.number().positive().default(15),
  LOGIN_SLOW_AFTER: z.coerce.number().int().min(0).default(5),
  LOGIN_DELAY_MS: z.coerce.number().int().min(0).max(60_000).default(500),
  LOGIN_MAX_DELAY_S: z.coerce.number().min(0).max(120).default(10),
  PASSWORD_CHANGE_MAX_FAILS: z.coerce.number().int().positive().default(5),
  SESSION_IDLE_HOURS: z.coerce.number({ error: 'must be a number of hours' }).positive('must be more than 0').max(24 * 30).default(12),
  SESSION_MAX_DAYS: z.coerce.number({ error: 'must be a number of days' }).positive('must be more than 0').max(365).default(7),
  SESSIONS_PER_USER: z.coerce.number({ error: 'must be a whole number from 1 to 100' }).int('must be a whole number from 1 to 100').min(1, 'must be a whole number from 1 to 100').max(100, 'must be a whole number from 1 to 100').default(10),
  SCRYPT_COST: z.coerce
    .number({ error: 'must be a power of two from 1024 to 1048576' })
    .int('must be a power of two from 1024 to 1048576')
    .min(1024, 'must be a power of two from 1024 to 1048576')
    .max(1_048_576, 'must be a power of two from 1024 to 1048576')
    .refine((n) => (n & (n - 1)) === 0, 'must be a power of two from 1024 to 1048576')
    .default(2 ** 15),
  /** Raw trace files: unset = the UPLOAD_DIR folder; s3://bucket/prefix?endpoint=…&region=…&forcePathStyle=on for S3-compatible object storage. */
  STORAGE_URL: z.url({ error: 'must be an s3:// URL' }).regex(/^s3:\/\/[^/?#]+/, 'must look like s3://bucket/prefix').optional(),
  /** How often some instance hands out again the jobs of an instance that died (PostgreSQL). */
  JOB_MAINTENANCE_S: z.coerce.number({ error: 'must be a whole number of seconds' }).int().min(1).max(3600).default(30),
  JOB_POLL_S: z.coerce.number({ error: 'must be a number of seconds' }).min(0.5).max(60).default(2),
  /** How long one step of a background job may run before another instance takes it over. */
  JOB_LEASE_S: z.coerce.number({ error: 'must be a whole number of seconds' }).int().min(1).max(3600).default(300),
  /** On SIGTERM: how long running jobs get to finish before they are handed back to the queue. */
  SHUTDOWN_GRACE_S: z.coerce.number({ error: 'must be a number of seconds' }).min(1).max(600).default(20),
  LOG_LEVEL: z
    .enum(['fatal', 'error', 'warn', 'info', 'debug', 'trace', 'silent'], { error: 'must be one of fatal, error, warn, info, debug, trace, silent' })
    .default('info'),
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
  /** The worker pool that analyses traces: threads, and each file's time and memory budget. */
  analysis: { threads: number; timeoutMs: number; memoryMb: number };
  /** Uploads larger than this are answered 202 and analysed in the background. */
  analysisInlineMaxBytes: number;
  /** Large files one person may have waiting for the background analysis at once (ANALYSIS_PENDING_PER_USER). */
  analysisPendingPerUser: number;
  /** Uploads one person may have under way at once on one instance (UPLOADS_AT_ONCE_PER_USER). */
  uploadsAtOncePerUser: number;
  uploadSweepMinAgeMs: number;
  /** The longest a request may take, upload included (Node's requestTimeout); headers must come within a minute of it. */
  requestTimeoutMs: number;
  /** How often the inbox is swept while running: a quarter of the minimum age, from 1 s to 60 s. */
  uploadSweepEveryMs: number;
  sqliteBusyTimeoutMs: number;
  cookieSecure: 'auto' | boolean;
  /** Reverse proxies in front of Rholog; the client address is read that many hops back in X-Forwarded-For. */
  trustProxyHops: number;
  login: {
    /** Failed tries from one address on one account before that pair is locked for the window. */
    maxPerPair: number;
    /** Failed tries from one address, on any accounts, before the address is refused for the window. */
    maxPerAddress: number;
    windowMs: number;
    /** Failed tries on one account (from anywhere) before its sign-ins are slowed down (never locked). */
    slowAfter: number;
    /** The first delay; each further failure doubles it, up to maxDelayMs. */
    delayMs: number;
    maxDelayMs: number;
  };
  /** Wrong current passwords on the change-password route per account per login window. */
  passwordChangeMaxFails: number;
  session: { idleMs: number; absoluteMs: number };
  /** Sessions one account may hold at once; a sign-in beyond this ends the account's oldest. */
  sessionsPerUser: number;
  /** scrypt's N (CPU/memory cost) for new password hashes; stored hashes keep their own. */
  scryptCost: number;
  logLevel: 'fatal' | 'error' | 'warn' | 'info' | 'debug' | 'trace' | 'silent';
  /** Where raw trace files are kept: undefined = uploadDir on this machine. */
  storageUrl?: string;
  jobs: { maintenanceSeconds: number; pollSeconds: number; leaseSeconds: number; shutdownGraceMs: number };
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
    host: e.HOST ?? (e.DEMO_DATA ? '127.0.0.1' : '0.0.0.0'),
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
    analysisInlineMaxBytes: e.ANALYSIS_INLINE_MAX_KB * 1024,
    analysisPendingPerUser: e.ANALYSIS_PENDING_PER_USER,
    uploadsAtOncePerUser: e.UPLOADS_AT_ONCE_PER_USER,
    analysis: {
      threads: e.ANALYSIS_THREADS ?? Math.min(8, Math.max(1, os.availableParallelism() - 1)),
      timeoutMs: Math.round(e.ANALYSIS_TIMEOUT_S * 1000),
      memoryMb: e.ANALYSIS_MEMORY_MB,
    },
    uploadSweepMinAgeMs: Math.round(e.UPLOAD_SWEEP_MIN_AGE_S * 1000),
    requestTimeoutMs: (e.REQUEST_TIMEOUT_S ?? Math.max(300, Math.ceil((e.MAX_UPLOAD_MB * 1024) / 32))) * 1000,
    uploadSweepEveryMs: Math.min(60_000, Math.max(1_000, Math.round(e.UPLOAD_SWEEP_MIN_AGE_S * 250))),
    sqliteBusyTimeoutMs: e.SQLITE_BUSY_TIMEOUT_MS,
    cookieSecure: e.COOKIE_SECURE === 'auto' ? 'auto' : e.COOKIE_SECURE === 'on',
    trustProxyHops: e.TRUST_PROXY,
    login: {
      maxPerPair: e.LOGIN_MAX_PER_PAIR,
      maxPerAddress: e.LOGIN_MAX_PER_ADDRESS,
      windowMs: Math.round(e.LOGIN_WINDOW_MIN * 60_000),
      slowAfter: e.LOGIN_SLOW_AFTER,
      delayMs: e.LOGIN_DELAY_MS,
      maxDelayMs: Math.round(e.LOGIN_MAX_DELAY_S * 1000),
    },
    passwordChangeMaxFails: e.PASSWORD_CHANGE_MAX_FAILS,
    session: { idleMs: Math.round(e.SESSION_IDLE_HOURS * 3_600_000), absoluteMs: Math.round(e.SESSION_MAX_DAYS * 86_400_000) },
    sessionsPerUser: e.SESSIONS_PER_USER,
    scryptCost: e.SCRYPT_COST,
    logLevel: e.LOG_LEVEL,
    storageUrl: e.STORAGE_URL,
    jobs: { maintenanceSeconds: e.JOB_MAINTENANCE_S, pollSeconds: e.JOB_POLL_S, leaseSeconds: e.JOB_LEASE_S, shutdownGraceMs: Math.round(e.SHUTDOWN_GRACE_S * 1000) },
    client: e.NODE_ENV === 'production' ? 'static' : e.NODE_ENV === 'development' ? 'vite' : 'none',
  };
}
