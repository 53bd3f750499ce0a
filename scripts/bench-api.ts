/**
 * npm run bench:api [-- --database sqlite:PATH] [-- --source]
 *
 * A bounded loopback check of the API at list scale. Seeds a SQLite database
 * with 53,000 traces and 100,000 findings (npm run seed:scale) unless one is
 * given, starts the built server (dist/server/index.js, or the TypeScript
 * source under tsx with --source or when nothing is built) as its own process
 * on 127.0.0.1, and prints:
 *   - upload to result of a 10,000-sample trace at concurrency 1, 4 and 16:
 *     p50, p95 and uploads per second, after unmeasured warm-up uploads (the
 *     first uploads to a fresh server run cold code), with enough uploads per
 *     level for a p95 to mean something, and the server's CPU time per upload
 *     (request thread, analysis and other threads) where /proc shows it;
 *   - p50/p95 of every list: first page, deep page, each sort, each filter and
 *     text search, for traces and findings, and the sites list.
 * Every loop has a fixed count and the run stops itself after RUN_LIMIT_MS.
 * Goal (checked here, never in tests): every list p95 under 50 ms.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import net, { type AddressInfo } from 'node:net';
import os from 'node:os';
import path from 'node:path';
import { parseArgs } from 'node:util';
import supertest from 'supertest';
import { stepTraceCsv } from '../tests/support/step-trace';
import { SCALE_PASSWORD, SCALE_TECH, seedScale } from './seed-scale';

const HOST = '127.0.0.1';
const RUN_LIMIT_MS = 10 * 60 * 1000;
const LIST_ROUNDS = 30;
const LIST_GOAL_MS = 50;
const UPLOAD_GOAL_MS = 50;
/** Uploads measured at each concurrency, and the unmeasured ones before the first level. */
const UPLOADS: Record<number, number> = { 1: 80, 4: 120, 16: 160 };
const WARM_UPLOADS = 12;

const { values } = parseArgs({ options: { database: { type: 'string' }, source: { type: 'boolean', default: false } } });
const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'rholog-bench-api-'));
let server: ChildProcess | null = null;

function stop(code: number): never {
  if (server && server.exitCode === null) server.kill('SIGKILL');
  fs.rmSync(dir, { recursive: true, force: true });
  process.exit(code);
}
setTimeout(() => {
  process.stderr.write(`bench:api: stopped after ${RUN_LIMIT_MS / 60000} minutes without finishing\n`);
  stop(1);
}, RUN_LIMIT_MS).unref();

const percentile = (v: number[], p: number) => {
  const s = [...v].sort((a, b) => a - b);
  return s[Math.min(s.length - 1, Math.ceil((p / 100) * s.length) - 1)] ?? NaN;
};
const load = () => os.loadavg().map((l) => l.toFixed(2)).join(' ');

/** CPU time (ms) of each thread of a process so far, by thread id, from /proc (Linux); null elsewhere. */
function threadCpuMs(pid: number | undefined): Map<number, number> | null {
  if (pid === undefined || !fs.existsSync(`/proc/${pid}/task`)) return null;
  const tick = 10; // USER_HZ is 100 on Linux: utime and stime count 10 ms ticks
  const out = new Map<number, number>();
  for (const tid of fs.readdirSync(`/proc/${pid}/task`)) {
    try {
      const fields = fs.readFileSync(`/proc/${pid}/task/${tid}/stat`, 'utf8').split(') ')[1].split(' ');
      out.set(Number(tid), (Number(fields[11]) + Number(fields[12])) * tick);
    } catch {
      // the thread ended between the listing and the read
    }
  }
  return out;
}

async function freePort(): Promise<number> {
  const s = net.createServer();
  await new Promise<void>((resolve) => s.listen(0, HOST, resolve));
  const port = (s.address() as AddressInfo).port;
  await new Promise<void>((resolve) => s.close(() => resolve()));
  return port;
}

async function main() {
  let databaseUrl = values.database;
  if (!databaseUrl) {
    databaseUrl = `sqlite:${path.join(dir, 'scale.sqlite')}`;
    const t0 = performance.now();
    const seeded = await seedScale(databaseUrl, { traces: 53_000, findings: 100_000 });
    console.log(`seeded ${seeded.traces} traces and ${seeded.findings} findings in ${((performance.now() - t0) / 1000).toFixed(1)} s`);
  }
  const built = path.resolve('dist/server/index.js');
  const useBuilt = !values.source && fs.existsSync(built);
  const port = await freePort();
  const base = `http://${HOST}:${port}`;
  const env = { NODE_ENV: 'test', HOST, PORT: String(port), DATABASE_URL: databaseUrl, UPLOAD_DIR: path.join(dir, 'uploads'), DEMO_DATA: 'off', LOG_LEVEL: 'warn' };
  server = spawn(process.execPath, useBuilt ? [built] : ['--import', 'tsx', 'server/index.ts'], { env: { ...process.env, ...env }, stdio: ['ignore', 'ignore', 'inherit'] });
  for (let i = 0; ; i++) {
    if (server.exitCode !== null) throw new Error(`the server exited with code ${server.exitCode}`);
    if (i > 600) throw new Error('the server did not answer /api/health within 60 s');
    if (await fetch(`${base}/api/health`).then((r) => r.ok, () => false)) break;
    await new Promise((r) => setTimeout(r, 100));
  }
  const agent = supertest.agent(base);
  const csrf0 = (await agent.get('/api/auth/csrf')).body.csrfToken as string;
  const login = await agent.post('/api/auth/login').set('x-csrf-token', csrf0).send({ email: SCALE_TECH, password: SCALE_PASSWORD });
  if (login.status !== 200) throw new Error(`sign-in answered ${login.status}`);
  const csrf = (login.body.csrfToken as string) ?? csrf0;

  const first = (await agent.get('/api/traces?pageSize=1')).body;
  const someTrace = first.items[0];
  const sites = (await agent.get('/api/sites')).body.items as Array<{ id: number }>;
  console.log(
    `Rholog API bench: ${useBuilt ? 'built server (node dist/server/index.js)' : 'server from source (tsx)'} on ${base}, ${first.total} traces listed, ${os.cpus().length} cores, load average ${load()}`,
  );

  // Uploads: a 10,000-sample trace, `concurrency` in flight at a time.
  // Each upload a different recording (the same bytes again would be answered as a duplicate).
  let fault = 0;
  const nextCsv = () => Buffer.from(stepTraceCsv({ faultM: 100 + 0.25 * fault++, vf: 0.66, samples: 10_000 }));
  const upload = async () => {
    const csv = nextCsv();
    const s = performance.now();
    const r = await agent.post('/api/traces').set('x-csrf-token', csrf).field('cableRunId', String(someTrace.cableRunId)).field('end', 'B').attach('file', csv, 'bench.csv');
    return { ms: performance.now() - s, status: r.status, body: r.body as unknown, bytes: Number(r.headers['content-length'] ?? 0) };
  };
  for (let i = 0; i < WARM_UPLOADS; i++) {
    const r = await upload();
    if (r.status !== 201) throw new Error(`a warm-up upload answered ${r.status}: ${JSON.stringify(r.body).slice(0, 200)}`);
  }
  const threads = Math.min(8, Math.max(1, os.availableParallelism() - 1));
  console.log(`\nupload to result, 10,000-sample trace (after ${WARM_UPLOADS} unmeasured; the server's default analysis pool here: ${threads} worker thread${threads === 1 ? '' : 's'})`);
  for (const concurrency of [1, 4, 16]) {
    const total = UPLOADS[concurrency];
    const times: number[] = [];
    let next = 0;
    let failed = 0;
    let answerBytes = 0;
    const cpu0 = threadCpuMs(server.pid);
    const t0 = performance.now();
    await Promise.all(
      Array.from({ length: concurrency }, async () => {
        while (next < total) {
          next++;
          const r = await upload();
          if (r.status !== 201 && failed++ === 0) console.log(`  (an upload answered ${r.status}: ${JSON.stringify(r.body).slice(0, 200)})`);
          times.push(r.ms);
          answerBytes = r.bytes;
        }
      }),
    );
    const wall = (performance.now() - t0) / 1000;
    const cpu1 = threadCpuMs(server.pid);
    const p95 = percentile(times, 95);
    console.log(
      `  concurrency ${String(concurrency).padStart(2)}: ${total} uploads, p50 ${percentile(times, 50).toFixed(1)} ms, p95 ${p95.toFixed(1)} ms, ${(total / wall).toFixed(1)} uploads/s${failed ? `, ${failed} FAILED` : ''}${concurrency === 1 && p95 >= UPLOAD_GOAL_MS ? `  over the ${UPLOAD_GOAL_MS} ms goal` : ''} (load ${load()})`,
    );
    if (cpu0 && cpu1) {
      // The request thread is the process's own id; the busiest other thread is the analysis worker.
      const used = [...cpu1].map(([tid, ms]) => [tid, (ms - (cpu0.get(tid) ?? 0)) / total] as const);
      const main = used.find(([tid]) => tid === server!.pid)?.[1] ?? 0;
      const others = used.filter(([tid]) => tid !== server!.pid).map(([, ms]) => ms).sort((a, b) => b - a);
      const rest = others.slice(1).reduce((a, b) => a + b, 0);
      console.log(`      server CPU per upload: request thread ${main.toFixed(1)} ms, busiest other thread ${(others[0] ?? 0).toFixed(1)} ms, the rest ${rest.toFixed(1)} ms; answer ${(answerBytes / 1024).toFixed(0)} KiB`);
    }
  }

  const lists: Array<[string, string]> = [
    ['traces: first page', '/api/traces'],
    ['traces: deep page (1,000 of 25)', '/api/traces?page=1000'],
    ['traces: sort by name', '/api/traces?sort=originalName&dir=asc'],
    ['traces: sort by name, deep page', '/api/traces?sort=originalName&dir=asc&page=1000'],
    ['traces: sort by status', '/api/traces?sort=status'],
    ['traces: sort by end', '/api/traces?sort=end&dir=asc'],
    ['traces: filter status=failed', '/api/traces?status=failed'],
    ['traces: filter end=A', '/api/traces?end=A'],
    ['traces: filter cable run', `/api/traces?cableRunId=${someTrace.cableRunId}`],
    ['traces: filter site', `/api/traces?siteId=${sites[0].id}`],
    ['traces: filter uploader', `/api/traces?uploadedById=${someTrace.uploadedBy?.id ?? someTrace.uploadedById ?? 1}`],
    ['traces: filter dates', `/api/traces?from=${new Date(Date.now() - 30 * 86_400_000).toISOString().slice(0, 10)}&to=${new Date(Date.now() - 10 * 86_400_000).toISOString().slice(0, 10)}`],
    ['traces: search q=riverside', '/api/traces?q=riverside'],
    ['traces: search q=nomatch', '/api/traces?q=pumphouse'],
    ['findings: first page', '/api/findings'],
    ['findings: deep page (2,000 of 25)', '/api/findings?page=2000'],
    ['findings: sort by distance', '/api/findings?sort=distanceM&dir=asc'],
    ['findings: sort by distance, deep page', '/api/findings?sort=distanceM&dir=asc&page=2000'],
    ['findings: sort by status', '/api/findings?sort=status'],
    ['findings: filter status=dismissed', '/api/findings?status=dismissed'],
    ['findings: filter site', `/api/findings?siteId=${sites[0].id}`],
    ['findings: filter cable run', `/api/findings?cableRunId=${someTrace.cableRunId}`],
    ['findings: filter trace', `/api/findings?traceId=${someTrace.id}`],
    ['findings: search q=hedge', '/api/findings?q=hedge'],
    ['findings: search q=nomatch', '/api/findings?q=pumphouse'],
    ['sites', '/api/sites'],
  ];
  console.log(`\nlists (${LIST_ROUNDS} requests each, one at a time, after 2 unmeasured)`);
  let over = 0;
  for (const [label, url] of lists) {
    const times: number[] = [];
    let status = 0;
    for (let i = 0; i < LIST_ROUNDS + 2; i++) {
      const s = performance.now();
      const r = await agent.get(url);
      if (i >= 2) times.push(performance.now() - s);
      status = r.status;
    }
    const p95 = percentile(times, 95);
    if (p95 >= LIST_GOAL_MS) over++;
    console.log(`  ${label.padEnd(40)} p50 ${percentile(times, 50).toFixed(1).padStart(6)} ms  p95 ${p95.toFixed(1).padStart(6)} ms${status !== 200 ? `  (answered ${status})` : ''}${p95 >= LIST_GOAL_MS ? '  over goal' : ''}`);
  }
  console.log(`\n${over === 0 ? 'every list' : `${lists.length - over} of ${lists.length} lists`} under the ${LIST_GOAL_MS} ms p95 goal (load average ${load()})`);
}

main().then(
  () => stop(0),
  (err) => {
    process.stderr.write(`bench:api: ${err instanceof Error ? err.message : String(err)}\n`);
    stop(1);
  },
);
