import nodemailer from 'nodemailer';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { OutboxMessage } from '../../server/db/models';
import type { OutboxMessageView } from '../../shared/schemas/outbox';
import { eventually } from './mail.support';
import { startApi, type Client, type TestApi } from './support/api';

/**
 * The administrators' outbox filter `?to=` finds the text as typed, in any case. It was a LIKE pattern built from
 * the text: "_" and "%" matched any character (`to=a_b@` found axb@…, `to=%` every message), and on PostgreSQL an
 * address the mail was sent to in capitals was missed while SQLite found it.
 */
let api: TestApi;
let admin: Client;

beforeAll(async () => {
  api = await startApi();
  admin = await api.as('admin');
  const client = nodemailer.createTransport({ host: '127.0.0.1', port: api.app.ctx.mail.capturePort!, secure: false, ignoreTLS: true, auth: api.app.ctx.mail.captureAuth! });
  await client.sendMail({ from: 'rholog@example.com', to: 'crew_one@example.com', subject: 'To the underscore address', text: 'one' });
  await client.sendMail({ from: 'rholog@example.com', to: 'crewxone@example.com', subject: 'To the x address', text: 'two' });
  await client.sendMail({ from: 'rholog@example.com', to: 'Field.Lead@Example.com', subject: 'To the capitals address', text: 'three' });
  client.close();
  await eventually(async () => (await OutboxMessage.count()) === 3, 'the three messages captured');
});
afterAll(() => api.close());

const subjects = async (to: string) => {
  const res = await admin.get(`/api/outbox?to=${encodeURIComponent(to)}`).expect(200);
  return (res.body.items as OutboxMessageView[]).map((m) => m.subject).sort();
};

describe('GET /api/outbox?to=', () => {
  it('takes "_" and "%" as the characters they are', async () => {
    expect(await subjects('crew_one@')).toEqual(['To the underscore address']);
    expect(await subjects('%')).toEqual([]);
    expect(await subjects('crew%one')).toEqual([]);
  });

  it('finds an address in any case', async () => {
    expect(await subjects('field.lead@example.com')).toEqual(['To the capitals address']);
    expect(await subjects('FIELD.LEAD')).toEqual(['To the capitals address']);
  });

  it('still finds part of an address', async () => {
    expect(await subjects('example.com')).toEqual(['To the capitals address', 'To the underscore address', 'To the x address']);
    expect(await subjects('crew')).toEqual(['To the underscore address', 'To the x address']);
  });
});
