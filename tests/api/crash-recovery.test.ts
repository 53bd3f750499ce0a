import { spawn, type ChildProcess } from 'node:child_process';
import { createHash } from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import sqlite3 from 'sqlite3';
import supertest from 'supertest';
import { afterAll, describe, expect, it } from 'vitest';
import { createApp } from '../../server/app';
import { hashPassword } from '../../server/auth/passwords';
import { SiteSupervisor, User } from '../../server/db/models';
import { testConfig } from '../support/test-config';
import { closedPort, eventually, startFlakyRelay, type TestRelay } from './mail.support';
import { makeRun, stepTraceCsv } from './support/field-fixtures';
import { TEST_PASSWORD } from './support/api';

/**
 * The server is killed with SIGKILL while uploads are arriving, then started
 * again on the same database and upload folder: the database must be intact,
 * every trace row must have its file (and every file a row, once the start-up
 * clean-up has run), and mail queued before the kill is delivered once.
 * SQLite only: the test owns the database file.
 */
const onSqlite = !/^postgres(ql)?:\/\//.test(process.env.DATABASE_URL ?? '');

const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'rholog-crash-'));
const dbFile = path.join(dir, 'rholog.sqlite');
const uploadDir = path.join(dir, 'uploads');
const children: ChildProcess[] = [];
let relay: TestRelay | undefined;

afterAll(async () => {
  for (const c of children) if (c.exitCode === null && c.signalCode === null) c.kill('SIGKILL');
  await relay?.close();
  fs.rmSync(dir, { recursive: true, force: true });
});

function query<T>(sql: string): Promise<T[]> {
  return new Promise((resolve, reject) => {
    const db = new sqlite3.Database(dbFile, sqlite3.OPEN_READONLY, (err) => {
      if (err) return reject(err);
      db.all(sql, (e, rows) => db.close(() => (e ? reject(e) : resolve(rows as T[]))));
    });
  });
}

/** One write to the database while no server is running. */
function exec(sql: string): Promise<void> {
  return new Promise((resolve, reject) => {
    const db = new sqlite3.Database(dbFile, (err) => {
      if (err) return reject(err);
      db.run(sql, (e) => db.close(() => (e ? reject(e) : resolve())));
    });
  });
}

async function startServer(port: number, env: Record<string, string>): Promise<ChildProcess> {
  // node itself with tsx's loader (not the tsx command, which runs the server in a second process the kill would miss).
  const child = spawn(process.execPath, ['--import', 'tsx', 'server/index.ts'], {
    env: {
      PATH: process.env.PATH,
      NODE_ENV: 'test',
      HOST: '127.0.0.1',
      PORT: String(port),
      DATABASE_URL: `sqlite:${dbFile}`,
      UPLOAD_DIR: uploadDir,
      DEMO_DATA: 'off',
      LOG_LEVEL: 'silent',
      SCRYPT_COST: '1024',
      UPLOAD_SWEEP_MIN_AGE_S: '0',
      MAIL_RETRY_BASE_S: '0.2',
      MAIL_MAX_ATTEMPTS: '50',
      // Eight uploads at once from one account: the per-person cap on uploads under way (its own test) is raised here.
      UPLOADS_AT_ONCE_PER_USER: '100',
      ...env,
    },
    stdio: ['ignore', 'ignore', 'pipe'],
  });
  children.push(child);
  let stderr = '';
  child.stderr!.on('data', (d) => (stderr += String(d)));
  await eventually(
    async () => {
      if (child.exitCode !== null) throw new Error(`the server exited (${child.exitCode}): ${stderr.slice(-500)}`);
      const res = await fetch(`http://127.0.0.1:${port}/api/health`);
      return res.ok;
    },
    'the server to answer /api/health',
    90_000,
  );
  return child;
}

async function signIn(base: string, email: string) {
  const agent = supertest.agent(base);
  const csrf = (await agent.get('/api/auth/csrf').expect(200)).body.csrfToken as string;
  const login = await agent.post('/api/auth/login').set('x-csrf-token', csrf).send({ email, password: TEST_PASSWORD }).expect(200);
  return { agent, csrf: (login.body.csrfToken as string) ?? csrf };
}

function storedFiles(folder: 'traces' | 'incoming') {
  const root = path.join(uploadDir, folder);
  return fs.existsSync(root) ? fs.readdirSync(root, { recursive: true, withFileTypes: true }).filter((d) => d.isFile()).map((d) => path.join(d.parentPath, d.name)) : [];
}

describe.runIf(onSqlite)('a server killed during uploads', () => {
  it('restarts with an intact database, no orphan files and its queued mail delivered once', async () => {
    // The database, people and a supervised run, made by the app itself (migrations), then closed.
    const setup = await createApp(testConfig(`sqlite:${dbFile}`, dir, { uploadDir }));
    const hash = await hashPassword(TEST_PASSWORD);
    const tech = await User.create({ email: 'tess.tech@example.com', name: 'Tess Tech', role: 'technician', passwordHash: hash });
    const sup = await User.create({ email: 'sol.super@example.com', name: 'Sol Super', role: 'supervisor', passwordHash: hash });
    const fx = await makeRun('Crash run');
    await SiteSupervisor.create({ siteId: fx.site.id, userId: sup.id });
    await setup.close();

    // First life: the mail relay is unreachable, so the supervisors' e-mail stays queued.
    const port = await closedPort();
    const base = `http://127.0.0.1:${port}`;
    const first = await startServer(port, { SMTP_URL: `smtp://127.0.0.1:${await closedPort()}` });
    const t = await signIn(base, tech.email);
    const upload = (faultM: number) =>
      t.agent
        .post('/api/traces')
        .set('x-csrf-token', t.csrf)
        .field('cableRunId', String(fx.run.id))
        .field('end', 'A')
        .attach('file', Buffer.from(stepTraceCsv({ faultM, vf: 0.66, samples: 10_000 })), `crash-${faultM}.csv`);
    const confirmed = await upload(150).expect(201);
    await t.agent
      .post('/api/findings')
      .set('x-csrf-token', t.csrf)
      .send({ traceId: confirmed.body.traces[0].id, eventIndex: 0, status: 'confirmed', kind: 'open-conductor' })
      .expect(201);
    await eventually(async () => (await query<{ n: number }>("SELECT count(*) AS n FROM mail_jobs WHERE status = 'queued' AND attempts > 0"))[0].n === 1, 'a failed first send');

    // Eight uploads at once; the server is killed as soon as the first is answered.
    const inFlight = [20, 30, 40, 50, 60, 70, 80, 90].map((m) => upload(m).then((r) => r.status, () => 'cut off'));
    await Promise.race(inFlight);
    first.kill('SIGKILL');
    await new Promise((resolve) => first.once('exit', resolve));
    const answers = await Promise.all(inFlight);
    expect(answers.filter((a) => a === 201).length).toBeGreaterThanOrEqual(1);

    // What a crash can leave: a file in the store with no row, an upload half-received in the inbox.
    const left = path.join(uploadDir, 'traces', '2025', '01', 'left-by-a-crash.csv');
    fs.mkdirSync(path.dirname(left), { recursive: true });
    fs.writeFileSync(left, stepTraceCsv({ faultM: 11, vf: 0.66 }));
    fs.writeFileSync(path.join(uploadDir, 'incoming', 'half-received.part'), 'time_ns,voltage_V\n0,0.1\n');

    // The queued mail's next try falls due now. Left as the first life set it, it waits out a back-off that
    // doubled with every failed try of that life (so with how long the machine took to get here), or, if the
    // kill cut a try off mid-send, the 5-minute lease: both are checked in mail-message-id.test.ts, not here.
    await exec("UPDATE mail_jobs SET status = 'queued', next_attempt_at = strftime('%Y-%m-%d %H:%M:%f +00:00', 'now', '-1 second') WHERE status IN ('queued', 'sending')");

    // Second life: the relay works.
    relay = await startFlakyRelay(0);
    const second = await startServer(port, { SMTP_URL: relay.url });

    expect(await query<{ integrity_check: string }>('PRAGMA integrity_check')).toEqual([{ integrity_check: 'ok' }]);
    expect(await query('PRAGMA foreign_key_check')).toEqual([]);
    const rows = await query<{ raw_path: string; sha256: string }>('SELECT raw_path, sha256 FROM traces');
    expect(rows.length).toBeGreaterThanOrEqual(2);
    expect(storedFiles('traces').sort()).toEqual([...new Set(rows.map((r) => path.join(uploadDir, r.raw_path)))].sort());
    expect(storedFiles('incoming')).toEqual([]);
    for (const r of rows) expect(createHash('sha256').update(fs.readFileSync(path.join(uploadDir, r.raw_path))).digest('hex')).toBe(r.sha256);

    const subject = /^Fault confirmed at /;
    await eventually(async () => (await query<{ status: string }>('SELECT status FROM mail_jobs'))[0]?.status === 'sent', 'the queued mail to be sent', 30_000);
    const delivered = relay.received.filter((m) => subject.test(m.subject ?? ''));
    expect(delivered).toHaveLength(1);
    expect(JSON.stringify(delivered[0].to)).toContain('sol.super@example.com');
    expect(await query('SELECT status, count(*) AS n FROM mail_jobs GROUP BY status')).toEqual([{ status: 'sent', n: 1 }]);

    second.kill('SIGTERM');
    await new Promise((resolve) => second.once('exit', resolve));
  }, 240_000);
});
