import { spawn, type ChildProcess } from 'node:child_process';
import { createHash } from 'node:crypto';
import path from 'node:path';
import supertest from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createApp, type RhologApp } from '../../server/app';
import { TRACES_PER_STEP } from '../../server/jobs/cable-reanalysis';
import type { AppConfig } from '../../server/config';
import { hashPassword } from '../../server/auth/passwords';
import { CableReanalysis, CableReanalysisItem, CableRun, CableType, MailJob, OutboxMessage, Trace, User } from '../../server/db/models';
import { startFakeS3, type FakeS3 } from '../support/fake-s3';
import { freshDatabase, testConfig } from '../support/test-config';
import { closedPort, eventually } from './mail.support';
import { makeRun, stepTraceCsv } from './support/field-fixtures';
import { TEST_PASSWORD, isPostgres } from './support/api';

/**
 * Rholog as several instances behind a proxy on one database and one object
 * store. On PostgreSQL two instances run: one in a child process (so it can be
 * killed outright) and one in this process. On SQLite, where one instance is
 * the rule, the same work goes to the one instance, with its in-process jobs
 * and an interrupted re-analysis finished after a restart.
 */

const JOBS = { maintenanceSeconds: 1, pollSeconds: 0.5, leaseSeconds: 5, shutdownGraceMs: 1 };
const UPLOADS = 50;
const MAILS = 20;
const WRONG_SIGN_INS = 40;
/** Uploads above this are analysed by a background job (a 3000-sample test file is about 38 kB, a 12,000-sample one about 157 kB). */
const INLINE_MAX_KB = 100;
const LARGE_UPLOADS = 6;

let db: Awaited<ReturnType<typeof freshDatabase>>;
let s3: FakeS3;
let config: AppConfig;
let b: RhologApp;
let child: ChildProcess | undefined;
let childStderr = '';
let childBase = '';
let runId: number;
let cableId: number;
/** Each instance as a client sees it: a supertest target (the in-process app, or the child's URL). */
const instances: Array<{ name: string; target: () => Parameters<typeof supertest.agent>[0] }> = [];

async function startChild(port: number) {
  child = spawn(process.execPath, ['--import', 'tsx', 'server/index.ts'], {
    env: {
      PATH: process.env.PATH,
      NODE_ENV: 'test',
      HOST: '127.0.0.1',
      PORT: String(port),
      DATABASE_URL: db.url,
      STORAGE_URL: config.storageUrl,
      UPLOAD_DIR: path.join(db.dir, 'uploads-child'),
      DEMO_DATA: 'off',
      LOG_LEVEL: 'silent',
      SCRYPT_COST: '1024',
      TRUST_PROXY: '1',
      LOGIN_DELAY_MS: '0',
      JOB_MAINTENANCE_S: String(JOBS.maintenanceSeconds),
      JOB_POLL_S: String(JOBS.pollSeconds),
      JOB_LEASE_S: String(JOBS.leaseSeconds),
      ANALYSIS_INLINE_MAX_KB: String(INLINE_MAX_KB),
      // Many uploads at once from one account: the per-person caps (their own tests) are raised here.
      UPLOADS_AT_ONCE_PER_USER: '100',
      ANALYSIS_PENDING_PER_USER: '100',
    },
    stdio: ['ignore', 'ignore', 'pipe'],
  });
  child.stderr!.on('data', (d) => (childStderr += String(d)));
  await eventually(
    async () => {
      if (child!.exitCode !== null) throw new Error(`the second instance exited (${child!.exitCode}): ${childStderr.slice(-500)}`);
      return (await fetch(`http://127.0.0.1:${port}/api/ready`)).ok;
    },
    'the second instance to be ready',
    90_000,
  );
}

async function signIn(target: Parameters<typeof supertest.agent>[0], email: string) {
  const agent = supertest.agent(target);
  const csrf = (await agent.get('/api/auth/csrf').expect(200)).body.csrfToken as string;
  const login = await agent.post('/api/auth/login').set('x-csrf-token', csrf).send({ email, password: TEST_PASSWORD }).expect(200);
  return { agent, csrf: login.body.csrfToken as string };
}

beforeAll(async () => {
  db = await freshDatabase();
  s3 = await startFakeS3();
  const base = testConfig(db.url, db.dir, {});
  config = { ...base, storageUrl: s3.storageUrl('multi'), trustProxyHops: 1, login: { ...base.login, delayMs: 0 }, jobs: JOBS, analysisInlineMaxBytes: INLINE_MAX_KB * 1024, uploadsAtOncePerUser: 100, analysisPendingPerUser: 100 };
  b = await createApp(config);
  const hash = await hashPassword(TEST_PASSWORD);
  for (const role of ['technician', 'planner'] as const) await User.create({ email: `${role}.multi@example.com`, name: `Multi ${role}`, role, passwordHash: hash });
  await User.create({ email: 'guessed.multi@example.com', name: 'Guessed Account', role: 'technician', passwordHash: hash });
  await User.create({ email: 'alone.multi@example.com', name: 'Single Instance', role: 'technician', passwordHash: hash });
  const made = await makeRun('Multi run');
  runId = made.run.id;
  cableId = made.cable.id;
  // A burst of mail already due when the second instance starts: it drains at start while the first is woken too.
  for (let i = 0; i < MAILS; i++) {
    await MailJob.create({ kind: 'test', toAddresses: 'crew.multi@example.com', subject: `Burst ${i}`, text: `Notice ${i}`, html: null, nextAttemptAt: new Date(), ticketId: null, findingId: null });
  }
  instances.push({ name: 'in-process', target: () => b.app });
  if (isPostgres) {
    const port = await closedPort();
    childBase = `http://127.0.0.1:${port}`;
    const starting = startChild(port);
    b.ctx.mail.queue.kick();
    await starting;
    instances.push({ name: 'child', target: () => childBase });
  } else {
    b.ctx.mail.queue.kick();
  }
}, 180_000);

afterAll(async () => {
  if (child && child.exitCode === null && child.signalCode === null) child.kill('SIGKILL');
  await b?.close();
  await s3?.close();
  await db?.cleanup();
});

describe(isPostgres ? 'two instances on one PostgreSQL database' : 'one instance on SQLite, with in-process jobs', () => {
  it(`stores each of ${UPLOADS} concurrent uploads once, split across the instances`, async () => {
    const clients = await Promise.all(instances.map((i) => signIn(i.target(), 'technician.multi@example.com')));
    const files = Array.from({ length: UPLOADS }, (_, i) => Buffer.from(stepTraceCsv({ faultM: 20 + 3 * i, vf: 0.66 }), 'utf8'));
    const answers = await Promise.all(
      files.map((csv, i) => {
        const c = clients[i % clients.length];
        return c.agent.post('/api/traces').set('x-csrf-token', c.csrf).field('cableRunId', String(runId)).field('end', 'A').attach('file', csv, `multi-${i}.csv`);
      }),
    );
    expect(answers.map((a) => a.status)).toEqual(files.map(() => 201));
    const rows = await Trace.findAll({ where: { cableRunId: runId, reanalysisOfId: null } });
    expect(rows).toHaveLength(UPLOADS);
    const sha = (b: Buffer) => createHash('sha256').update(b).digest('hex');
    expect(new Set(rows.map((r) => r.sha256))).toEqual(new Set(files.map(sha)));
    // Every file once in the shared store, and nothing else there.
    const keys = (await b.ctx.storage.list()).map((o) => o.key).sort();
    expect(keys).toEqual(rows.map((r) => r.rawPath).sort());
  });

  it(`sends each of a burst of ${MAILS} mails exactly once`, async () => {
    await eventually(async () => (await MailJob.count({ where: { status: 'sent' } })) === MAILS, 'the burst to be sent', 30_000);
    const jobIds = (await MailJob.findAll({ attributes: ['id'] })).map((j) => String(j.id));
    const perJob = new Map<string, number>();
    for (const m of await OutboxMessage.findAll()) {
      const job = /X-Rholog-Mail-Job: (\d+)/i.exec(m.headers)?.[1];
      if (job) perJob.set(job, (perJob.get(job) ?? 0) + 1);
    }
    expect([...perJob.keys()].sort()).toEqual(jobIds.sort());
    expect([...perJob.values()]).toEqual(jobIds.map(() => 1));
  });

  it(`analyses each of ${LARGE_UPLOADS} large uploads once in the background, whichever instance took them`, async () => {
    // A run of its own cable type, so the re-analysis below still covers the first run's traces only.
    const cable = await CableType.create({
      name: 'Multi foam PE coax',
      construction: 'coax',
      dielectric: 'foamed polyethylene',
      z0Ohm: 50,
      vf: 0.82,
      vfTolerance: 0.02,
      attenuationDbPer100m: null,
      attenuationFreqMhz: null,
      vfSource: 'handbook',
      vfReference: 'foamed PE, common practice',
      notes: null,
    });
    const run = await CableRun.create({ siteId: (await CableRun.findByPk(runId))!.siteId, name: 'Multi long run', cableTypeId: cable.id, endALabel: 'Vault V-2', endBLabel: 'Pole 31', installedLengthM: 900, notes: null });
    const clients = await Promise.all(instances.map((i) => signIn(i.target(), 'technician.multi@example.com')));
    const files = Array.from({ length: LARGE_UPLOADS }, (_, i) => Buffer.from(stepTraceCsv({ faultM: 300 + 40 * i, vf: 0.82, samples: 12_000 }), 'utf8'));
    const answers = await Promise.all(
      files.map((csv, i) => {
        const c = clients[i % clients.length];
        return c.agent.post('/api/traces').set('x-csrf-token', c.csrf).field('cableRunId', String(run.id)).field('end', 'A').attach('file', csv, `long-${i}.csv`);
      }),
    );
    expect(answers.map((a) => [a.status, a.body.traces[0].status])).toEqual(files.map(() => [202, 'pending']));
    await eventually(async () => (await Trace.count({ where: { cableRunId: run.id, status: 'ok' } })) === LARGE_UPLOADS, 'every large upload analysed', 120_000);
    const rows = await Trace.findAll({ where: { cableRunId: run.id }, order: [['id', 'ASC']] });
    // Each analysed by one try: no instance analysed a trace another was analysing.
    expect(rows.map((r) => [r.status, r.analysisAttempts, r.analysisLeaseUntil])).toEqual(files.map(() => ['ok', 1, null]));
    // The open placed at 300 + 40·i m when the file was made (d = VF·c·t/2, hand-worked); engine goal max(0.5 m, 1 %).
    for (const r of rows) {
      const i = Number(/^long-(\d+)\.csv$/.exec(r.originalName)![1]);
      const open = r.analysis!.events.find((e) => e.type === 'open')!;
      expect(Math.abs(open.distanceM - (300 + 40 * i))).toBeLessThan(Math.max(0.5, 0.01 * (300 + 40 * i)));
    }
    if (isPostgres) {
      const [done] = await b.ctx.sequelize.query("SELECT count(*)::int AS n FROM pgboss.job WHERE name = 'trace-analysis' AND state = 'completed'");
      expect((done as Array<{ n: number }>)[0].n).toBe(LARGE_UPLOADS);
    }
  });

  it(`locks an account and address pair after the same number of failures, however ${WRONG_SIGN_INS} wrong sign-ins are spread`, async () => {
    const attempt = async (target: Parameters<typeof supertest.agent>[0], email: string, from: string) => {
      const agent = supertest.agent(target);
      const csrf = (await agent.get('/api/auth/csrf').expect(200)).body.csrfToken as string;
      return (await agent.post('/api/auth/login').set('x-csrf-token', csrf).set('x-forwarded-for', from).send({ email, password: 'not-the-password' })).status;
    };
    // Documentation addresses (RFC 5737), one per scenario, so the per-address limit of one does not reach the other.
    const spread: number[] = [];
    for (let i = 0; i < WRONG_SIGN_INS; i++) spread.push(await attempt(instances[i % instances.length].target(), 'guessed.multi@example.com', '203.0.113.10'));
    const single: number[] = [];
    for (let i = 0; i < WRONG_SIGN_INS; i++) single.push(await attempt(instances[0].target(), 'alone.multi@example.com', '203.0.113.20'));
    const limit = config.login.maxPerPair;
    const expected = [...Array(limit).fill(401), ...Array(WRONG_SIGN_INS - limit).fill(429)];
    expect(single).toEqual(expected);
    expect(spread).toEqual(expected);
  });

  it('finishes a re-analysis whose instance went away mid-run, with no trace analysed into two results', async () => {
    const planner = await signIn(instances[instances.length - 1].target(), 'planner.multi@example.com');
    await planner.agent.patch(`/api/cables/${cableId}`).set('x-csrf-token', planner.csrf).send({ vf: 0.7, reason: 'Drum measured at the yard' }).expect(200);
    const started = await planner.agent.post(`/api/cables/${cableId}/reanalyses`).set('x-csrf-token', planner.csrf).expect(202);
    const runIdR = started.body.id as number;
    expect(started.body.traceTotal).toBe(UPLOADS);

    if (isPostgres) {
      // Both instances each holding a step: the child's is one of them. Kill it outright.
      await eventually(
        async () => {
          const [rows] = await b.ctx.sequelize.query("SELECT count(*)::int AS n FROM pgboss.job WHERE name = 'cable-reanalysis' AND state = 'active'");
          return (rows as Array<{ n: number }>)[0].n >= 2;
        },
        'both instances to be running a step',
        60_000,
      );
      expect((await CableReanalysis.findByPk(runIdR))!.status).toBe('running');
      child!.kill('SIGKILL');
      await eventually(async () => child!.signalCode === 'SIGKILL', 'the second instance to die');
      await eventually(async () => (await CableReanalysis.findByPk(runIdR))!.status === 'done', 'the other instance to finish the run', 120_000);
      // The killed instance's step ran out its lease and was handed out again.
      const [retried] = await b.ctx.sequelize.query("SELECT count(*)::int AS n FROM pgboss.job WHERE name = 'cable-reanalysis' AND retry_count > 0");
      expect((retried as Array<{ n: number }>)[0].n).toBeGreaterThanOrEqual(1);
    } else {
      // One instance: stopped mid-run (its step is called off between traces), then started again on the same database.
      const underWay = await eventually(async () => {
        const done = await CableReanalysisItem.count({ where: { reanalysisId: runIdR } });
        return done >= 1 && done < UPLOADS - TRACES_PER_STEP ? done : undefined;
      }, 'the run to be under way', 60_000);
      expect(underWay).toBeLessThan(UPLOADS);
      expect((await CableReanalysis.findByPk(runIdR))!.status).toBe('running');
      await b.close();
      b = await createApp(config);
      await eventually(async () => (await CableReanalysis.findByPk(runIdR))!.status === 'done', 'the restarted instance to finish the run', 120_000);
    }
    expect(await CableReanalysisItem.count({ where: { reanalysisId: runIdR } })).toBe(UPLOADS);
    const originals = await Trace.findAll({ where: { cableRunId: runId, reanalysisOfId: null }, attributes: ['id'] });
    for (const t of originals) expect(await Trace.count({ where: { reanalysisOfId: t.id } })).toBe(1);
  });
});
