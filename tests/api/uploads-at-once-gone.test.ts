import fs from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Trace } from '../../server/db/models';
import { AnalysisPool, analysisPool } from '../../server/traces/analysis-pool';
import { inboxDir } from '../../server/traces/trace-store';
import { listenRaw, type RawHttp } from './support/raw-http';
import { startApi, type Client, type TestApi } from './support/api';
import { eventually } from './mail.support';
import { makeRun, stepTraceCsv } from './support/field-fixtures';

/**
 * An upload's place among UPLOADS_AT_ONCE_PER_USER is held until the server is done with its files, not until its
 * sender stops listening. A sender who sends a whole form and hangs up at once leaves the server analysing the
 * files and holding them in the inbox; if the place were freed at the hang-up, one account could send form after
 * form and have any number of them in the inbox and the analysis queue at once.
 */
let api: TestApi;
let raw: RawHttp;

beforeAll(async () => {
  api = await startApi({ uploadsAtOncePerUser: 1, analysis: { threads: 1, timeoutMs: 120_000, memoryMb: 256 } });
  raw = await listenRaw(api);
});
afterAll(async () => {
  await raw.close();
  await api.close();
});

/** A whole upload sent on a socket of its own, which the caller may close without reading the answer. */
async function sendWhole(c: Client, runId: number, name: string, csv: string) {
  const cookie = c.agent.jar.getCookies({ domain: '127.0.0.1', path: '/', secure: false, script: false }).toValueString();
  const body = [
    '--XB',
    'Content-Disposition: form-data; name="cableRunId"',
    '',
    String(runId),
    '--XB',
    'Content-Disposition: form-data; name="end"',
    '',
    'A',
    '--XB',
    `Content-Disposition: form-data; name="file"; filename="${name}"`,
    'Content-Type: text/csv',
    '',
    csv,
    '--XB--',
    '',
  ].join('\r\n');
  const socket = raw.connect();
  await new Promise((r) => socket.once('connect', r));
  socket.write(
    `POST /api/traces HTTP/1.1\r\nHost: 127.0.0.1\r\nCookie: ${cookie}\r\nx-csrf-token: ${c.csrf}\r\n` +
      `Content-Type: multipart/form-data; boundary=XB\r\nContent-Length: ${Buffer.byteLength(body)}\r\n\r\n${body}`,
  );
  return socket;
}

type Analyse = (task: { path: string }, options?: { owner?: string }) => Promise<unknown>;

describe('an upload whose sender hangs up once the form is sent', () => {
  it('keeps its place until its files are analysed and stored, so the next one waits its turn', async () => {
    const { run } = await makeRun('Hang-up run');
    const tess = await api.as('technician');
    const inbox = inboxDir(api.app.ctx.config.uploadDir);
    const pool = analysisPool(api.app.ctx);
    const first = stepTraceCsv({ faultM: 40, vf: 0.66 });
    const second = stepTraceCsv({ faultM: 70, vf: 0.66 });
    const traces = await Trace.count();

    // The first file is held before the analysis until the test lets it go (or a second file arrives, so a
    // server that let the second in does not leave this test waiting).
    const real = Reflect.get(AnalysisPool.prototype, 'analyse') as Analyse;
    const seen: string[] = [];
    let release!: () => void;
    const released = new Promise<void>((r) => (release = r));
    Reflect.set(pool, 'analyse', async function (this: AnalysisPool, task: { path: string }, options?: { owner?: string }) {
      const text = fs.readFileSync(task.path, 'utf8');
      seen.push(text);
      if (text === first) await released;
      else release();
      return real.call(this, task, options);
    });
    try {
      const socket = await sendWhole(tess, run.id, 'hung-up.csv', first);
      await eventually(async () => seen.includes(first), 'the first file to reach the analysis');
      socket.destroy();
      // The server is still at work on the first upload: its file is in the inbox.
      expect(fs.readdirSync(inbox).filter((f) => f.endsWith('.part'))).toHaveLength(1);

      const refused = await tess.postRaw('/api/traces').field('cableRunId', String(run.id)).field('end', 'B').attach('file', Buffer.from(second), 'second.csv');
      expect(refused.status).toBe(429);
      expect(refused.body.error.code).toBe('too_many_uploads');
      expect(seen).not.toContain(second);

      release();
      // The hung-up upload was whole: it is stored, its inbox file removed, and its place freed.
      await eventually(async () => (await Trace.count()) === traces + 1, 'the hung-up upload to be stored');
      await eventually(async () => fs.readdirSync(inbox).filter((f) => f.endsWith('.part')).length === 0, 'its inbox file to be removed');
      let next: { status: number } | undefined;
      await eventually(async () => {
        next = await tess.postRaw('/api/traces').field('cableRunId', String(run.id)).field('end', 'B').attach('file', Buffer.from(second), 'second.csv');
        return next.status !== 429;
      }, 'the place to be free again');
      expect(next!.status).toBe(201);
      expect(await Trace.count()).toBe(traces + 2);
    } finally {
      release();
      Reflect.deleteProperty(pool, 'analyse');
    }
  });
});
