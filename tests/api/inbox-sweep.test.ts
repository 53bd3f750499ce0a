import fs from 'node:fs';
import http from 'node:http';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Trace } from '../../server/db/models';
import { sweepInbox } from '../../server/traces/trace-store';
import { eventually } from './mail.support';
import { listenOnLoopback, startApi, type LoopbackServer, type TestApi } from './support/api';
import { makeRun, stepTraceCsv } from './support/field-fixtures';

/**
 * An upload cut off by a killed process leaves its `.part` file in the inbox (uploads/incoming). The start-up sweep
 * removed it, but only at the next start: a server that ran for weeks kept every such file. The inbox is now swept
 * while running too, leaving alone files younger than the minimum age and the files of uploads still in progress,
 * however old.
 */
const MIN_AGE_MS = 60_000;
let api: TestApi;
let loop: LoopbackServer;
let port: number;
let inbox: string;

beforeAll(async () => {
  // The sweep runs every 100 ms here (a quarter of the minimum age, at least 1 s, when read from the environment).
  api = await startApi({ uploadSweepMinAgeMs: MIN_AGE_MS, uploadSweepEveryMs: 100 });
  inbox = path.join(api.app.ctx.config.uploadDir, 'incoming');
  fs.mkdirSync(inbox, { recursive: true });
  loop = await listenOnLoopback(api);
  port = loop.port;
});
afterAll(async () => {
  await loop.close();
  await api.close();
});

/** A file in the inbox last written `ageMs` ago. */
function plant(name: string, ageMs: number) {
  const file = path.join(inbox, name);
  fs.writeFileSync(file, 'time_ns,volts\n0,0.1\n');
  const when = new Date(Date.now() - ageMs);
  fs.utimesSync(file, when, when);
  return file;
}

describe('the inbox while the server runs', () => {
  it('loses an unfinished upload once it is older than the minimum age, and keeps a younger one', async () => {
    const young = plant('young.part', 5_000);
    const left = plant('cut-off.part', MIN_AGE_MS + 60_000);
    await eventually(async () => !fs.existsSync(left), 'the sweep while running to remove the cut-off upload');
    expect(fs.existsSync(young)).toBe(true);
    fs.rmSync(young);
  });

  it('keeps the file of an upload still arriving, however old', async () => {
    const { run } = await makeRun('Sweep run');
    const tess = await api.as('technician');
    const cookie = tess.agent.jar.getCookies({ domain: '127.0.0.1', path: '/', secure: false, script: false }).toValueString();
    const boundary = 'sweep-boundary-1';
    const csv = stepTraceCsv({ faultM: 90, vf: 0.66 });
    const head =
      `--${boundary}\r\nContent-Disposition: form-data; name="cableRunId"\r\n\r\n${run.id}\r\n` +
      `--${boundary}\r\nContent-Disposition: form-data; name="end"\r\n\r\nA\r\n` +
      `--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="slow.csv"\r\nContent-Type: text/csv\r\n\r\n`;
    const half = Math.floor(csv.length / 2);
    let arriving!: http.ClientRequest;
    const answer = new Promise<{ status: number; body: string }>((resolve, reject) => {
      const req = http.request(
        {
          host: '127.0.0.1',
          port,
          method: 'POST',
          path: '/api/traces',
          headers: { cookie, 'x-csrf-token': tess.csrf, 'content-type': `multipart/form-data; boundary=${boundary}` },
        },
        (res) => {
          let body = '';
          res.on('data', (d) => (body += String(d)));
          res.on('end', () => resolve({ status: res.statusCode!, body }));
        },
      );
      req.on('error', reject);
      req.write(head + csv.slice(0, half));
      arriving = req;
    });

    // The first half has arrived: its file is in the inbox. Made old, it is still not swept: its upload holds it.
    const part = await eventually(async () => fs.readdirSync(inbox).find((f) => f.endsWith('.part') && fs.statSync(path.join(inbox, f)).size > 0), 'the upload to reach the inbox');
    const old = new Date(Date.now() - MIN_AGE_MS - 60_000);
    fs.utimesSync(path.join(inbox, part), old, old);
    const removed = await sweepInbox(api.app.ctx.config.uploadDir, MIN_AGE_MS);
    expect(removed).toEqual([]);
    expect(fs.existsSync(path.join(inbox, part))).toBe(true);

    arriving.end(csv.slice(half) + `\r\n--${boundary}--\r\n`);
    const res = await answer;
    expect(res.status).toBe(201);
    const stored = JSON.parse(res.body) as { traces: Array<{ id: number; originalName: string; status: string }> };
    expect(stored.traces.map((t) => [t.originalName, t.status])).toEqual([['slow.csv', 'ok']]);
    expect((await Trace.findByPk(stored.traces[0].id))!.sizeBytes).toBe(Buffer.byteLength(csv));
    // Done with, the upload's inbox file is gone, and the inbox holds nothing else.
    expect(fs.readdirSync(inbox)).toEqual([]);
  });
});
