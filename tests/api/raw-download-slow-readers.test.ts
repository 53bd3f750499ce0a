import { createHash } from 'node:crypto';
import http from 'node:http';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { listenOnLoopback, startApi, type LoopbackServer, type TestApi } from './support/api';
import { eventually } from './mail.support';
import { makeRun, stepTraceCsv } from './support/field-fixtures';

/**
 * A raw trace file can be up to the upload limit (20 MB). Downloads read by slow or stalled clients (a phone on a
 * poor link, or a hostile one that never reads) must not each keep the whole file in the server's memory until
 * they finish: some dozens of them would use up the server's memory. The file is checked against its SHA-256 and
 * then sent as the client takes it, so what waits for a client is a small buffer, not the file.
 */
let api: TestApi;
let loop: LoopbackServer;
let port: number;

beforeAll(async () => {
  api = await startApi();
  loop = await listenOnLoopback(api);
  port = loop.port;
});
afterAll(async () => {
  await loop.close();
  await api.close();
});

describe('GET /api/traces/:id/raw read by clients that do not read', () => {
  it('keeps only a small buffer per download waiting in the server, and sends the exact file to a client that reads', async () => {
    const { run } = await makeRun('Slow reader run');
    const tess = await api.as('technician');
    // About 16 MB: a long record, stored and analysed in the background.
    const csv = Buffer.from(stepTraceCsv({ faultM: 120, vf: 0.66, samples: 1_000_000 }));
    expect(csv.length).toBeGreaterThan(12 * 1024 * 1024);
    const up = await tess.postRaw('/api/traces').field('cableRunId', String(run.id)).field('end', 'A').attach('file', csv, 'long-record.csv');
    expect([201, 202]).toContain(up.status);
    const id = up.body.traces[0].id as number;
    const cookie = ([] as string[])
      .concat(tess.agent.jar.getCookies({ domain: '127.0.0.1', path: '/', secure: false, script: false }).toValueString())
      .join('; ');

    // Four downloads whose readers never read.
    const stalled: http.IncomingMessage[] = [];
    const requests = Array.from({ length: 4 }, () =>
      http.get({ host: '127.0.0.1', port, path: `/api/traces/${id}/raw`, headers: { cookie } }, (res) => {
        res.pause();
        stalled.push(res);
      }),
    );
    await eventually(async () => stalled.length === 4, 'the four downloads to begin');
    expect(stalled.map((r) => r.statusCode)).toEqual([200, 200, 200, 200]);
    // What the server holds for them in memory, beyond what the operating system's socket buffers took.
    const waiting = [...loop.sockets].reduce((n, s) => n + s.writableLength, 0);
    expect(waiting).toBeLessThan(4 * 1024 * 1024);
    for (const r of requests) r.destroy();

    // A client that reads gets the file byte for byte.
    const whole = await new Promise<Buffer>((resolve, reject) => {
      http
        .get({ host: '127.0.0.1', port, path: `/api/traces/${id}/raw`, headers: { cookie } }, (res) => {
          const parts: Buffer[] = [];
          res.on('data', (d: Buffer) => parts.push(d));
          res.on('end', () => resolve(Buffer.concat(parts)));
          res.on('error', reject);
        })
        .on('error', reject);
    });
    expect(whole.length).toBe(csv.length);
    expect(createHash('sha256').update(whole).digest('hex')).toBe(createHash('sha256').update(csv).digest('hex'));
  }, 120_000);
});
