import { gzipSync } from 'node:zlib';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { CableType, Trace } from '../../server/db/models';
import { makeRun, stepTraceCsv } from './support/field-fixtures';
import { startApi, type Client, type TestApi } from './support/api';

// A file upload is a multipart form read as it arrives; the form reader does not undo a Content-Encoding.
// A compressed form, or a plain one labelled compressed, is refused with 415 saying what to send, and nothing is stored.

let api: TestApi;
let tech: Client;
let planner: Client;
let runId: number;
beforeAll(async () => {
  api = await startApi();
  tech = await api.as('technician');
  planner = await api.as('planner');
  runId = (await makeRun('Encoded upload run')).run.id;
});
afterAll(() => api.close());

const BOUNDARY = 'rholog-test-boundary';
function form(fields: Record<string, string>, file: { name: string; body: string }): Buffer {
  const parts = Object.entries(fields).map(
    ([k, v]) => `--${BOUNDARY}\r\nContent-Disposition: form-data; name="${k}"\r\n\r\n${v}\r\n`,
  );
  parts.push(
    `--${BOUNDARY}\r\nContent-Disposition: form-data; name="file"; filename="${file.name}"\r\nContent-Type: text/csv\r\n\r\n${file.body}\r\n`,
  );
  return Buffer.from(`${parts.join('')}--${BOUNDARY}--\r\n`);
}

describe('a file upload with a Content-Encoding', () => {
  it('is refused with 415 naming the header, whether the form is compressed or only labelled so, and stores nothing', async () => {
    const plain = form({ cableRunId: String(runId), end: 'A' }, { name: 'gz.csv', body: stepTraceCsv({ faultM: 90, vf: 0.66 }) });
    const before = await Trace.count();
    for (const body of [gzipSync(plain), plain]) {
      const res = await tech
        .postRaw('/api/traces')
        .set('Content-Type', `multipart/form-data; boundary=${BOUNDARY}`)
        .set('Content-Encoding', 'gzip')
        .send(body)
        .expect(415);
      expect(res.body.error.code).toBe('body_encoding_unsupported');
      expect(res.body.error.message).toBe(
        'A file upload (multipart/form-data) is read uncompressed, and this one says Content-Encoding "gzip": send the form without Content-Encoding. Nothing was stored.',
      );
      expect(res.body.error.fields).toEqual([
        { field: 'Content-Encoding', message: 'must be absent (or identity) on a file upload' },
      ]);
    }
    expect(await Trace.count()).toBe(before);
    // The cable library's import form is a file upload too.
    const csv =
      'name,construction,dielectric,z0_ohm,vf,vf_tolerance,vf_source,vf_reference\nEncoded coax,coax,solid polyethylene,50,0.66,0.02,handbook,common practice\n';
    const imp = await planner
      .postRaw('/api/cables/import')
      .set('Content-Type', `multipart/form-data; boundary=${BOUNDARY}`)
      .set('Content-Encoding', 'deflate')
      .send(form({ reason: 'new entries' }, { name: 'c.csv', body: csv }))
      .expect(415);
    expect(imp.body.error.code).toBe('body_encoding_unsupported');
    expect(await CableType.count({ where: { name: 'Encoded coax' } })).toBe(0);
    // Sent plain, the same form is stored.
    await tech.postRaw('/api/traces').set('Content-Type', `multipart/form-data; boundary=${BOUNDARY}`).send(plain).expect(201);
    expect(await Trace.count()).toBe(before + 1);
  });
});
