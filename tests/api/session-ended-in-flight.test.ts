import fs from 'node:fs';
import http from 'node:http';
import type { AddressInfo } from 'node:net';
import supertest from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Session } from '../../server/db/models';
import { inboxDir } from '../../server/traces/trace-store';
import { startApi, TEST_PASSWORD, type TestApi } from './support/api';
import { eventually } from './mail.support';
import { makeRun, stepTraceCsv } from './support/field-fixtures';

/**
 * A session ended while one of its requests is still under way (a password
 * change on another phone, an administrator's reset, a deactivation) stays
 * ended: the request finishing afterwards must not write the session's row
 * back, or the ended session would sign its holder in again.
 */
let api: TestApi;
let server: http.Server;
let port: number;

beforeAll(async () => {
  api = await startApi();
  server = api.app.app.listen(0, '127.0.0.1');
  await new Promise((r) => server.once('listening', r));
  port = (server.address() as AddressInfo).port;
});
afterAll(async () => {
  await new Promise((r) => server.close(r));
  await api.close();
});

/** Sign in with a bare agent and return it with the session cookie and id (the cookie is "s:<sid>.<signature>"). */
async function signedIn(email: string) {
  const agent = supertest.agent(api.app.app);
  const csrf = (await agent.get('/api/auth/csrf').expect(200)).body.csrfToken;
  const res = await agent.post('/api/auth/login').set('x-csrf-token', csrf).send({ email, password: TEST_PASSWORD }).expect(200);
  const cookies = ([] as string[]).concat(res.headers['set-cookie'] ?? []).map((c) => c.split(';')[0]);
  const raw = decodeURIComponent(cookies.find((c) => c.startsWith('rholog.sid='))!.slice('rholog.sid='.length));
  return { agent, cookie: cookies.join('; '), csrf: res.body.csrfToken as string, sid: raw.slice(2, raw.lastIndexOf('.')) };
}

/** Move a session's idle clock back, so that its next request moves it on and saves the session. */
async function lastSeenAgo(sid: string, ms: number) {
  const row = (await Session.findByPk(sid))!;
  const data = JSON.parse(row.data) as { lastSeenAt: number };
  data.lastSeenAt = Date.now() - ms;
  await Session.update({ data: JSON.stringify(data) }, { where: { sid } });
}

/**
 * An upload whose file is held half-sent: it has passed the session by the time its file is being written to the
 * inbox. `finish()` sends the rest and resolves with the answer's status.
 */
async function heldUpload(who: { cookie: string; csrf: string }, runId: number) {
  const inbox = inboxDir(api.app.ctx.config.uploadDir);
  const before = new Set(fs.existsSync(inbox) ? fs.readdirSync(inbox) : []);
  const boundary = 'held-upload-boundary';
  const csv = stepTraceCsv({ faultM: 60, vf: 0.66 });
  const head =
    `--${boundary}\r\nContent-Disposition: form-data; name="cableRunId"\r\n\r\n${runId}\r\n` +
    `--${boundary}\r\nContent-Disposition: form-data; name="end"\r\n\r\nA\r\n` +
    `--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="held.csv"\r\nContent-Type: text/csv\r\n\r\n`;
  const tail = `\r\n--${boundary}--\r\n`;
  const cut = Math.floor(csv.length / 2);
  const body = [head + csv.slice(0, cut), csv.slice(cut) + tail];
  const req = http.request({
    host: '127.0.0.1',
    port,
    method: 'POST',
    path: '/api/traces',
    headers: {
      cookie: who.cookie,
      'x-csrf-token': who.csrf,
      'content-type': `multipart/form-data; boundary=${boundary}`,
      'content-length': Buffer.byteLength(body[0]) + Buffer.byteLength(body[1]),
    },
  });
  const answer = new Promise<number>((resolve, reject) => {
    req.on('response', (res) => {
      res.resume();
      res.on('end', () => resolve(res.statusCode!));
    });
    req.on('error', reject);
  });
  req.write(body[0]);
  await eventually(async () => fs.existsSync(inbox) && fs.readdirSync(inbox).some((f) => !before.has(f) && f.endsWith('.part')), 'the upload reaching the inbox');
  return {
    finish: () => {
      req.end(body[1]);
      return answer;
    },
  };
}

describe('a session ended while its request is under way', () => {
  it('stays ended after a password change on another phone, however the request finishes', async () => {
    const { run } = await makeRun('Held upload run');
    const stolen = await signedIn('technician.test@example.com');
    const owner = await api.as('technician');
    await lastSeenAgo(stolen.sid, 90_000);
    const upload = await heldUpload(stolen, run.id);
    // The owner changes the password: every other session of the account ends, this one among them.
    await owner.post('/api/auth/password', { currentPassword: TEST_PASSWORD, newPassword: 'Quartz-lantern-meadow-71' }).expect(200);
    expect(await Session.findByPk(stolen.sid)).toBeNull();
    expect(await upload.finish()).toBe(201);
    expect(await Session.findByPk(stolen.sid)).toBeNull();
    await stolen.agent.get('/api/auth/me').expect(401);
    await owner.get('/api/auth/me').expect(200);
  });

  it('stays ended after an administrator resets the password', async () => {
    const { run } = await makeRun('Held upload run 2');
    const sup = await signedIn('supervisor.test@example.com');
    await lastSeenAgo(sup.sid, 90_000);
    const upload = await heldUpload(sup, run.id);
    const admin = await api.as('admin');
    await admin.post(`/api/users/${api.users.supervisor.id}/reset-password`).expect(200);
    expect(await upload.finish()).toBe(201);
    expect(await Session.count({ where: { userId: api.users.supervisor.id } })).toBe(0);
    await sup.agent.get('/api/auth/me').expect(401);
  });
});
