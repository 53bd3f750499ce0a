import { randomBytes, timingSafeEqual } from 'node:crypto';
import type { AddressInfo } from 'node:net';
import { simpleParser, type AddressObject } from 'mailparser';
import { SMTPServer } from 'smtp-server';
import { OutboxMessage } from '../db/models/outbox-message';

export interface CaptureServer {
  port: number;
  /** Made afresh at every start and known only to this process: Rholog's own mailer signs in with them. */
  auth: { user: string; pass: string };
  close: () => Promise<void>;
}

const sameText = (a: string, b: string) => {
  const x = Buffer.from(a);
  const y = Buffer.from(b);
  return x.length === y.length && timingSafeEqual(x, y);
};

/** 127.0.0.0/8 and ::1, also as IPv4-mapped IPv6. */
export const isLoopback = (address: string | undefined) => !!address && /^(::ffff:)?127\.|^::1$/.test(address);

function addressText(a: AddressObject | AddressObject[] | undefined): string | null {
  if (!a) return null;
  return (Array.isArray(a) ? a : [a]).map((x) => x.text).join(', ');
}

/**
 * A real SMTP server on the loopback interface that keeps every message it is
 * given in outbox_messages instead of relaying it. Rholog starts it when no
 * SMTP_URL is set, so mail works on a fresh machine and admins can read it.
 *
 * Only Rholog's own mailer may hand it mail, so what the Outbox shows really
 * came from Rholog: it answers loopback connections only, and every session
 * must sign in (AUTH PLAIN or LOGIN) with a user name and password generated
 * at each start and never written anywhere. Plain-text AUTH is acceptable
 * here because the connection never leaves the machine.
 */
export async function startCaptureServer(options: { port: number; log: (m: string) => void }): Promise<CaptureServer> {
  const auth = { user: `rholog-${randomBytes(6).toString('hex')}`, pass: randomBytes(24).toString('base64url') };
  const server = new SMTPServer({
    authOptional: false,
    authMethods: ['PLAIN', 'LOGIN'],
    allowInsecureAuth: true,
    disabledCommands: ['STARTTLS'],
    banner: 'Rholog capture server',
    size: 10 * 1024 * 1024,
    logger: false,
    onConnect(session, callback) {
      if (isLoopback(session.remoteAddress)) return callback();
      callback(Object.assign(new Error('This server takes mail from this machine only.'), { responseCode: 554 }));
    },
    onAuth(credentials, _session, callback) {
      if (sameText(credentials.username ?? '', auth.user) && sameText(credentials.password ?? '', auth.pass)) {
        return callback(null, { user: auth.user });
      }
      callback(Object.assign(new Error('Authentication failed.'), { responseCode: 535 }));
    },
    onData(stream, session, callback) {
      simpleParser(stream)
        .then(async (mail) => {
          const receivedAt = new Date();
          // A notification sent again after its sender stopped mid-send carries the same Message-ID: keep the first copy only.
          if (mail.messageId && (await OutboxMessage.findOne({ where: { messageId: mail.messageId }, attributes: ['id'] }))) {
            options.log(`capture server: ${mail.messageId} was already received; the repeat is not stored again`);
            return callback();
          }
          await OutboxMessage.create({
            messageId: mail.messageId ?? null,
            fromAddress: addressText(mail.from) ?? (session.envelope.mailFrom ? session.envelope.mailFrom.address : ''),
            toAddresses: addressText(mail.to) ?? '',
            ccAddresses: addressText(mail.cc),
            envelopeTo: session.envelope.rcptTo.map((r) => r.address).join(', '),
            subject: mail.subject ?? '',
            text: mail.text ?? null,
            html: typeof mail.html === 'string' ? mail.html : null,
            headers: JSON.stringify(mail.headerLines),
            sentAt: mail.date ?? receivedAt,
            receivedAt,
          });
          callback();
        })
        .catch((err: Error) => {
          options.log(`capture server could not store a message: ${err.message}`);
          callback(Object.assign(new Error('The message could not be stored; try again later.'), { responseCode: 451 }));
        });
    },
  });
  server.on('error', (err) => options.log(`capture server: ${err.message}`));
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(options.port, '127.0.0.1', () => {
      server.off('error', reject);
      resolve();
    });
  });
  const port = (server.server.address() as AddressInfo).port;
  return {
    port,
    auth,
    close: () => new Promise<void>((resolve) => server.close(() => resolve())),
  };
}
