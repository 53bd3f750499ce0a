/**
 * npm run load — a bounded load and fault check on this machine's loopback.
 *
 * Starts the server as its own process on a fresh SQLite database and upload
 * folder, then prints:
 *   - 50 concurrent uploads of a 10,000-sample trace: errors, rows stored, p50/p95;
 *   - 30 concurrent comments on one ticket and 10 concurrent ticket creations: errors;
 *   - /api/health latency while a 19.9 MB one-line file (under the 20 MB
 *     limit, so it reaches the reader) is being refused.
 * Every request goes to 127.0.0.1; every loop has a fixed count; the whole run
 * stops itself after RUN_LIMIT_MS. Speed goals belong here, never in tests.
 *
 * `npm run load -- --server dist/server/index.js` runs a built server with node
 * instead of the TypeScript source under tsx.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import net, { type AddressInfo } from 'node:net';
import os from 'node:os';
import path from 'node:path';
import supertest from 'supertest';
import { createApp } from '../server/app';
import { hashPassword } from '../server/auth/passwords';
import { loadConfig } from '../server/config';
import { CableRun, CableType, Site, SiteSupervisor, User } from '../server/db/models';
import { stepTraceCsv } from '../tests/support/step-trace';

const HOST = '127.0.0.1';
const RUN_LIMIT_MS = 10 * 60 * 1000;
const PASSWORD = 'load-check-password-7';
const UPLOADS = 50;
const COMMENTS = 30;
const TICKETS = 10;
const SAMPLES = 10_000;

const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'rholog-load-'));
const env = {
  NODE_ENV: 'test',
  HOST,
  DATABASE_URL: `sqlite:${path.join(dir, 'rholog.sqlite')}`,
  UPLOAD_DIR: path.join(dir, 'uploads'),
  DEMO_DATA: 'off',
  LOG_LEVEL: 'warn',
  MAX_UPLOAD_MB: '20',
  // One technician's account stands in for fifty people uploading at once, so the per-person caps on uploads
  // under way and files waiting (4 and 20 by default) are raised: this run measures the server, not the caps.
  UPLOADS_AT_ONCE_PER_USER: '100',
  ANALYSIS_PENDING_PER_USER: '100',
};
let server: ChildProcess | null = null;

function stop(code: number): never {
  if (server && server.exitCode === null) server.kill('SIGKILL');
  fs.rmSync(dir, { recursive: true, force: true });
  process.exit(code);
}
setTimeout(() => {
  process.stderr.write(`load: stopped after ${RUN_LIMIT_MS / 60000} minutes without finishing\n`);
  stop(1);
}, RUN_LIMIT_MS).unref();

const percentile = (values: number[], p: number) => {
  const s = [...values].sort((a, b) => a - b);
  return s[Math.min(s.length - 1, Math.ceil((p / 100) * s.length) - 1)] ?? NaN;
};
const ms = (v: number) => `${Math.round(v)} ms`;

async function freePort(): Promise<number> {
  const s = net.createServer();
  await new Promise<void>((resolve) => s.listen(0, HOST, resolve));
  const port = (s.address() as AddressInfo).port;
  await new Promise<void>((resolve) => s.close(() => resolve()));
  return port;
}

/** The people and the cable run the check works on, written through the app's own models and migrations. */
async function prepare() {
  const app = await createApp({ ...loadConfig({ ...env, SCRYPT_COST: '16384' }) });
  const hash = await hashPassword(PASSWORD);
  const tech = await User.create({ email: 'load.tech@example.com', name: 'Lee Load', role: 'technician', passwordHash: hash });
  const sup = await User.create({ email: 'load.super@example.com', name: 'Sky Super', role: 'supervisor', passwordHash: hash });
  const cable = await CableType.create({
    name: 'Load-check solid PE coax',
    construction: 'coax',
    dielectric: 'solid polyethylene',
    z0Ohm: 50,
    vf: 0.66,
    vfTolerance: 0.02,
    attenuationDbPer100m: null,
    attenuationFreqMhz: null,
    vfSource: 'handbook',
    vfReference: 'solid PE, εr ≈ 2.3 (common practice)',
    notes: null,
  });
  const site = await Site.create({ name: 'Harrowmere load-check yard', address: null, latitude: null, longitude: null, accessNotes: null });
  await SiteSupervisor.create({ siteId: site.id, userId: sup.id });
  const run = await CableRun.create({ siteId: site.id, name: 'Yard feeder', cableTypeId: cable.id, endALabel: 'Cabinet Y-1', endBLabel: 'Pole Y-9', installedLengthM: 400, notes: null });
  await app.close();
  return { tech, sup, runId: run.id };
}

const builtServer = process.argv.includes('--server') ? process.argv[process.argv.indexOf('--server') + 1] : undefined;

async function startServer(port: number) {
  const args = builtServer ? [builtServer] : ['--import', 'tsx', 'server/index.ts'];
  const child = spawn(process.execPath, args, { env: { ...process.env, ...env, PORT: String(port) }, stdio: ['ignore', 'ignore', 'inherit'] });
  server = child;
  for (let i = 0; i < 600; i++) {
    if (child.exitCode !== null) throw new Error(`the server exited with code ${child.exitCode}`);
    const up = await fetch(`http://${HOST}:${port}/api/health`).then(
      (r) => r.ok,
      () => false,
    );
    if (up) return;
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error('the server did not answer /api/health within 60 s');
}

async function signIn(base: string, email: string) {
  const agent = supertest.agent(base);
  const csrf = (await agent.get('/api/auth/csrf')).body.csrfToken as string;
  const login = await agent.post('/api/auth/login').set('x-csrf-token', csrf).send({ email, password: PASSWORD });
  if (login.status !== 200) throw new Error(`sign-in as ${email} answered ${login.status}`);
  return { agent, csrf: (login.body.csrfToken as string) ?? csrf };
}

async function main() {
  const { tech, sup, runId } = await prepare();
  const port = await freePort();
  const base = `http://${HOST}:${port}`;
  await startServer(port);
  const t = await signIn(base, tech.email);
  const s = await signIn(base, sup.email);
  console.log(`Rholog load check: ${builtServer ? `built server ${builtServer}` : 'server from source (tsx)'} on ${base} (its own process, fresh SQLite database), ${os.cpus().length} cores, load average ${os.loadavg().map((l) => l.toFixed(2)).join(' ')}`);

  // 1. Fifty uploads at once, each a different 10k-sample recording (an open every 4 m from 20 m).
  const upload = (faultM: number) => {
    const csv = Buffer.from(stepTraceCsv({ faultM, vf: 0.66, samples: SAMPLES }));
    const started = performance.now();
    return t.agent
      .post('/api/traces')
      .set('x-csrf-token', t.csrf)
      .field('cableRunId', String(runId))
      .field('end', 'A')
      .attach('file', csv, `yard-${faultM}.csv`)
      .then(
        (r) => ({ status: r.status, ms: performance.now() - started, id: r.body?.traces?.[0]?.id as number | undefined }),
        () => ({ status: 0, ms: performance.now() - started, id: undefined }),
      );
  };
  const uploads = await Promise.all(Array.from({ length: UPLOADS }, (_, i) => upload(20 + 4 * i)));
  const listed = await t.agent.get(`/api/traces?cableRunId=${runId}&pageSize=1`);
  const uploadErrors = uploads.filter((u) => u.status !== 201);
  const times = uploads.map((u) => u.ms);
  console.log(
    `${UPLOADS} concurrent uploads of a ${SAMPLES.toLocaleString('en-GB')}-sample trace: ${uploadErrors.length} errors${uploadErrors.length ? ` (${uploadErrors.map((u) => u.status).join(', ')})` : ''}, ${listed.body.total} of ${UPLOADS} stored, p50 ${ms(percentile(times, 50))}, p95 ${ms(percentile(times, 95))}, max ${ms(Math.max(...times))}`,
  );

  // 2. Findings on eleven of those traces: one ticket for the comments, ten raised at once.
  const ids = uploads.map((u) => u.id).filter((id): id is number => id !== undefined);
  const findings: number[] = [];
  for (const id of ids.slice(0, TICKETS + 1)) {
    const f = await t.agent.post('/api/findings').set('x-csrf-token', t.csrf).send({ traceId: id, eventIndex: 0, status: 'confirmed', kind: 'open-conductor' });
    if (f.status === 201) findings.push(f.body.id);
  }
  const ticket = await s.agent.post('/api/tickets').set('x-csrf-token', s.csrf).send({ findingIds: [findings[0]], priority: 'normal' });
  const comments = await Promise.all(
    Array.from({ length: COMMENTS }, (_, i) =>
      s.agent
        .post(`/api/tickets/${ticket.body.id}/comments`)
        .set('x-csrf-token', s.csrf)
        .send({ comment: `Load-check note ${i + 1}` })
        .then(
          (r) => r.status,
          () => 0,
        ),
    ),
  );
  const timeline = await s.agent.get(`/api/tickets/${ticket.body.id}`);
  const recorded = (timeline.body.timeline ?? []).filter((e: { kind: string }) => e.kind === 'comment').length;
  console.log(`${COMMENTS} concurrent comments on one ticket: ${comments.filter((c) => c !== 200).length} errors, ${recorded} of ${COMMENTS} recorded`);
  const raised = await Promise.all(
    findings.slice(1, TICKETS + 1).map((findingId) =>
      s.agent
        .post('/api/tickets')
        .set('x-csrf-token', s.csrf)
        .send({ findingIds: [findingId], priority: 'normal' })
        .then(
          (r) => r.status,
          () => 0,
        ),
    ),
  );
  console.log(`${TICKETS} concurrent ticket creations: ${raised.filter((c) => c !== 201).length} errors, ${raised.filter((c) => c === 201).length} of ${TICKETS} raised`);

  // 3. /api/health while a hostile file is read and refused: a header, then one 19.9 MB line.
  const hostile = Buffer.concat([Buffer.from('time_ns,voltage_V\n'), Buffer.alloc(Math.round(19.9 * 1024 * 1024), '7'), Buffer.from('\n')]);
  let refusing = true;
  const health: number[] = [];
  const poll = (async () => {
    while (refusing && health.length < 2000) {
      const started = performance.now();
      await fetch(`${base}/api/health`).then((r) => r.arrayBuffer());
      health.push(performance.now() - started);
      await new Promise((r) => setTimeout(r, 10));
    }
  })();
  const refusedStarted = performance.now();
  const refused = await t.agent.post('/api/traces').set('x-csrf-token', t.csrf).field('cableRunId', String(runId)).field('end', 'B').attach('file', hostile, 'one-line.csv');
  const refusedMs = performance.now() - refusedStarted;
  refusing = false;
  await poll;
  const stored = refused.body?.error?.traces?.[0];
  console.log(
    `/api/health while a 19.9 MB one-line file is refused (${refused.status} ${refused.body?.error?.code ?? ''} after ${ms(refusedMs)}, stored as ${stored?.status ?? '?'} with a ${stored?.error?.message?.length ?? '?'}-character message): ${health.length} requests, p50 ${ms(percentile(health, 50))}, p95 ${ms(percentile(health, 95))}, max ${ms(Math.max(...health))}`,
  );

  server!.kill('SIGTERM');
  await new Promise((resolve) => server!.once('exit', resolve));
  stop(uploadErrors.length || comments.some((c) => c !== 200) || raised.some((c) => c !== 201) ? 1 : 0);
}

main().catch((err) => {
  process.stderr.write(`load: ${err instanceof Error ? err.message : String(err)}\n`);
  stop(1);
});
