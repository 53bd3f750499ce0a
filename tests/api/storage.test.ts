import { createHash } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { PutObjectCommand, S3Client } from '@aws-sdk/client-s3';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Trace } from '../../server/db/models';
import { FolderStorage } from '../../server/storage/folder-storage';
import { RawFileChanged, RawFileMissing } from '../../server/storage';
import { parseS3Url, S3Storage } from '../../server/storage/s3-storage';
import { startFakeS3, type FakeS3 } from '../support/fake-s3';
import { makeRun, stepTraceCsv } from './support/field-fixtures';
import { startApi, type Client, type TestApi } from './support/api';

const sha = (b: Buffer | string) => createHash('sha256').update(b).digest('hex');

function rawBody(c: Client, url: string) {
  return c.get(url).buffer(true).parse((r, cb) => {
    const chunks: Buffer[] = [];
    r.on('data', (d: Buffer) => chunks.push(d));
    r.on('end', () => cb(null, Buffer.concat(chunks)));
  });
}

describe('STORAGE_URL', () => {
  it('reads bucket, prefix, endpoint, region and key pair from an s3:// URL', () => {
    expect(parseS3Url('s3://AK:s%2Fecret@field-traces/harrowmere/raw?endpoint=http%3A%2F%2F10.0.0.5%3A9000&region=eu-west-1&forcePathStyle=on')).toEqual({
      bucket: 'field-traces',
      prefix: 'harrowmere/raw/',
      endpoint: 'http://10.0.0.5:9000',
      region: 'eu-west-1',
      forcePathStyle: true,
      credentials: { accessKeyId: 'AK', secretAccessKey: 's/ecret' },
    });
    expect(parseS3Url('s3://field-traces')).toMatchObject({ bucket: 'field-traces', prefix: '', region: 'us-east-1', forcePathStyle: false, credentials: undefined });
  });
});

describe('the folder store', () => {
  it('keeps the bytes, and refuses them once they no longer match their SHA-256', async () => {
    const dir = fs.mkdtempSync(path.join(fs.realpathSync('/tmp'), 'rholog-folder-'));
    try {
      const store = new FolderStorage(dir);
      const inbox = path.join(dir, 'incoming.part');
      fs.writeFileSync(inbox, 'time_ns,amplitude\n0,0\n1,0.5\n');
      const key = await store.adopt(inbox, new Date(Date.UTC(2026, 11, 2)));
      expect(key).toMatch(/^traces\/2026\/12\/[0-9a-f-]{36}\.csv$/);
      expect(fs.existsSync(inbox)).toBe(false);
      const digest = sha('time_ns,amplitude\n0,0\n1,0.5\n');
      expect((await store.read(key, digest)).toString()).toBe('time_ns,amplitude\n0,0\n1,0.5\n');
      expect((await store.list()).map((o) => o.key)).toEqual([key]);
      const abs = path.join(dir, key);
      fs.chmodSync(abs, 0o640);
      fs.writeFileSync(abs, 'time_ns,amplitude\n0,0\n1,0.9\n');
      await expect(store.read(key, digest)).rejects.toBeInstanceOf(RawFileChanged);
      await expect(store.checkout(key, digest)).rejects.toBeInstanceOf(RawFileChanged);
      await store.remove(key);
      await expect(store.read(key, digest)).rejects.toBeInstanceOf(RawFileMissing);
    } finally {
      fs.rmSync(dir, { recursive: true, force: true });
    }
  });
});

describe('raw traces in S3-compatible object storage', () => {
  let s3: FakeS3;
  let api: TestApi;
  let runId: number;
  beforeAll(async () => {
    s3 = await startFakeS3();
    api = await startApi({ storageUrl: s3.storageUrl('harrowmere') });
    runId = (await makeRun()).run.id;
  });
  afterAll(async () => {
    await api?.close();
    await s3?.close();
  });

  it('stores an upload as an object, serves it back byte for byte and analyses it again from there', async () => {
    expect(api.app.ctx.storage.kind).toBe('s3');
    await api.app.ctx.storage.ping();
    const csv = Buffer.from(stepTraceCsv({ faultM: 100, vf: 0.66 }).replace(/\n/g, '\r\n'), 'utf8');
    const c = await api.as('technician');
    const res = await c.postRaw('/api/traces').field('cableRunId', String(runId)).field('end', 'A').attach('file', csv, 'from-cabinet.csv').expect(201);
    const t = res.body.traces[0];
    expect(t.sha256).toBe(sha(csv));
    const row = (await Trace.findByPk(t.id))!;
    // Nothing under the local upload folder but the (empty) inbox: the file is in the bucket.
    expect(fs.existsSync(path.join(api.app.ctx.config.uploadDir, row.rawPath))).toBe(false);
    expect((await api.app.ctx.storage.list()).map((o) => o.key)).toContain(row.rawPath);

    const raw = await rawBody(c, `/api/traces/${t.id}/raw`).expect(200);
    expect(Buffer.compare(raw.body as Buffer, csv)).toBe(0);
    expect(raw.headers['x-content-sha256']).toBe(sha(csv));

    // Analysed again: the bytes are fetched from the bucket, checked, and handed to the analysis workers.
    const again = await c.post(`/api/traces/${t.id}/reanalyse`).expect(201);
    expect(again.body.sha256).toBe(sha(csv));
    expect(again.body.samples.length).toBeGreaterThan(100);
    const open = again.body.analysis.events.find((e: { type: string }) => e.type === 'open');
    // d = VF·c·t/2 with the open placed at 100 m when the file was made; the engine's goal is max(0.5 m, 1 %).
    expect(Math.abs(open.distanceM - 100)).toBeLessThan(0.5);
  });

  it('refuses an object whose bytes were changed in the bucket', async () => {
    const csv = Buffer.from(stepTraceCsv({ faultM: 60, vf: 0.66 }), 'utf8');
    const c = await api.as('technician');
    const res = await c.postRaw('/api/traces').field('cableRunId', String(runId)).field('end', 'B').attach('file', csv, 'from-pole.csv').expect(201);
    const row = (await Trace.findByPk(res.body.traces[0].id))!;
    const where = parseS3Url(s3.storageUrl('harrowmere'));
    const client = new S3Client({ region: where.region, endpoint: where.endpoint, forcePathStyle: true, credentials: where.credentials });
    await client.send(new PutObjectCommand({ Bucket: where.bucket, Key: `${where.prefix}${row.rawPath}`, Body: Buffer.concat([csv, Buffer.from('20000,0.75\n')]) }));
    client.destroy();
    const raw = await c.get(`/api/traces/${row.id}/raw`).expect(409);
    expect(raw.body.error.code).toBe('raw_file_changed');
    expect((await c.post(`/api/traces/${row.id}/reanalyse`).expect(409)).body.error.code).toBe('raw_file_changed');
  });

  it('answers 410 for an object that is gone', async () => {
    const csv = Buffer.from(stepTraceCsv({ faultM: 150, vf: 0.66 }), 'utf8');
    const c = await api.as('technician');
    const res = await c.postRaw('/api/traces').field('cableRunId', String(runId)).field('end', 'A').attach('file', csv, 'gone.csv').expect(201);
    const row = (await Trace.findByPk(res.body.traces[0].id))!;
    await (api.app.ctx.storage as S3Storage).remove(row.rawPath);
    expect((await c.get(`/api/traces/${row.id}/raw`).expect(410)).body.error.code).toBe('raw_file_missing');
  });
});
