import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Trace } from '../../server/db/models';
import { captureLog } from './support/log-capture';
import { listenRaw, type RawHttp } from './support/raw-http';
import { startApi, type TestApi } from './support/api';
import { eventually } from './mail.support';
import { makeRun } from './support/field-fixtures';

/**
 * A phone that loses its signal in the middle of an upload closes the connection with half a form sent. That is
 * the field's everyday weather, not a fault of the server: it was logged as an error ("request failed", with a
 * stack) as if something had broken, so an error alert would fire for every dropped upload.
 */
let api: TestApi;
let raw: RawHttp;
const log = captureLog();

beforeAll(async () => {
  api = await startApi({ logLevel: 'info' }, { logDestination: log.stream });
  raw = await listenRaw(api);
});
afterAll(async () => {
  await raw.close();
  await api.close();
});

describe('an upload whose sender goes away half-way', () => {
  it('stores nothing, leaves nothing in the inbox, and is not logged as a server error', async () => {
    const { run } = await makeRun('Dropped upload run');
    const tess = await api.as('technician');
    const cookie = tess.agent.jar.getCookies({ domain: '127.0.0.1', path: '/', secure: false, script: false }).toValueString();
    const traces = await Trace.count();
    const inbox = path.join(api.app.ctx.config.uploadDir, 'incoming');
    const errorsBefore = log.lines.filter((l) => Number(l.level) >= 50).length;

    const socket = raw.connect();
    await new Promise((r) => socket.once('connect', r));
    const head = [
      '--XB',
      'Content-Disposition: form-data; name="cableRunId"',
      '',
      String(run.id),
      '--XB',
      'Content-Disposition: form-data; name="end"',
      '',
      'A',
      '--XB',
      'Content-Disposition: form-data; name="file"; filename="dropped.csv"',
      'Content-Type: text/csv',
      '',
      'Distance (m),Level (V)',
    ].join('\r\n');
    socket.write(
      `POST /api/traces HTTP/1.1\r\nHost: 127.0.0.1\r\nCookie: ${cookie}\r\nx-csrf-token: ${tess.csrf}\r\n` +
        `Content-Type: multipart/form-data; boundary=XB\r\nContent-Length: 5000000\r\n\r\n${head}\r\n`,
    );
    for (let i = 0; i < 2000; i++) socket.write(`${i * 0.1},0.0${i % 10}\r\n`);
    // The file part has reached the inbox; then the sender is gone.
    await eventually(async () => fs.readdirSync(inbox).length > 0, 'the part file to be written');
    socket.destroy();

    await eventually(async () => fs.readdirSync(inbox).length === 0, 'the part file to be removed');
    // The server answered the request it can no longer deliver an answer to; give its logger the moment it takes.
    await eventually(async () => log.lines.some((l) => l.msg === 'upload-cut-off' || (Number(l.level) >= 50 && l.msg === 'request failed')), 'the cut-off upload to be logged');
    expect(log.lines.filter((l) => Number(l.level) >= 50).length).toBe(errorsBefore);
    expect(await Trace.count()).toBe(traces);
  });
});
