import fs from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Trace } from '../../server/db/models';
import { inboxDir } from '../../server/traces/trace-store';
import { listenRaw, type RawHttp } from './support/raw-http';
import { startApi, type Client, type TestApi } from './support/api';
import { eventually } from './mail.support';
import { makeRun, stepTraceCsv } from './support/field-fixtures';

/**
 * Every upload under way holds a connection and up to ten files' worth of the inbox's disk. One account opening
 * dozens of uploads that trickle in a byte at a time would fill the disk and the connections for everyone, so
 * each person may have at most UPLOADS_AT_ONCE_PER_USER under way; the next is refused at once with 429.
 */
let api: TestApi;
let raw: RawHttp;
const CAP = 2;

beforeAll(async () => {
  api = await startApi({ uploadsAtOncePerUser: CAP });
  raw = await listenRaw(api);
});
afterAll(async () => {
  await raw.close();
  await api.close();
});

/** An upload whose file part has begun and then stalls, as a slow sender's does. */
async function stalledUpload(c: Client, runId: number) {
  const cookie = c.agent.jar.getCookies({ domain: '127.0.0.1', path: '/', secure: false, script: false }).toValueString();
  const socket = raw.connect();
  await new Promise((r) => socket.once('connect', r));
  const head = [
    '--XB',
    'Content-Disposition: form-data; name="cableRunId"',
    '',
    String(runId),
    '--XB',
    'Content-Disposition: form-data; name="end"',
    '',
    'A',
    '--XB',
    'Content-Disposition: form-data; name="file"; filename="slow.csv"',
    'Content-Type: text/csv',
    '',
    'Distance (m),Level (V)',
  ].join('\r\n');
  socket.write(
    `POST /api/traces HTTP/1.1\r\nHost: 127.0.0.1\r\nCookie: ${cookie}\r\nx-csrf-token: ${c.csrf}\r\n` +
      `Content-Type: multipart/form-data; boundary=XB\r\nContent-Length: 5000000\r\n\r\n${head}\r\n0,0.01\r\n`,
  );
  return socket;
}

const inboxParts = () => fs.readdirSync(inboxDir(api.app.ctx.config.uploadDir)).filter((f) => f.endsWith('.part'));

describe('uploads under way at once, per person', () => {
  it('refuses one past the limit with 429 naming it, leaves other people alone, and takes the next once one ends', async () => {
    const { run } = await makeRun('Slow senders run');
    const tess = await api.as('technician');
    const csv = Buffer.from(stepTraceCsv({ faultM: 60, vf: 0.66 }));
    const traces = await Trace.count();

    const first = await stalledUpload(tess, run.id);
    await stalledUpload(tess, run.id);
    await eventually(async () => inboxParts().length === CAP, 'both stalled uploads to be under way');

    const refused = await tess.postRaw('/api/traces').field('cableRunId', String(run.id)).field('end', 'B').attach('file', csv, 'third.csv').expect(429);
    expect(refused.body.error).toEqual({
      code: 'too_many_uploads',
      message: 'You have 2 uploads under way; each person may send at most 2 at once. Nothing was stored: send this one again when one of them has finished.',
      fields: [{ field: 'file', message: 'at most 2 uploads at once per person' }],
      limit: 2,
      retryAfterSeconds: 30,
    });
    expect(refused.headers['retry-after']).toBe('30');
    expect(await Trace.count()).toBe(traces);

    // Another person's upload is not held by them.
    const sup = await api.as('supervisor');
    const theirs = await sup.postRaw('/api/traces').field('cableRunId', String(run.id)).field('end', 'B').attach('file', csv, 'theirs.csv').expect(201);
    expect(theirs.body.traces[0].status).toBe('ok');

    // One of the slow uploads is given up: its place is free again.
    first.destroy();
    await eventually(async () => inboxParts().length === 1, 'the dropped upload to end');
    const next = await tess.postRaw('/api/traces').field('cableRunId', String(run.id)).field('end', 'A').attach('file', csv, 'next.csv').expect(201);
    expect(next.body.traces[0].status).toBe('ok');
    expect(await Trace.count()).toBe(traces + 2);
  });
});
