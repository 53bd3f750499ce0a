import type { AddressInfo } from 'node:net';
import { simpleParser, type AddressObject } from 'mailparser';
import { SMTPServer } from 'smtp-server';
import { OutboxMessage } from '../db/models/outbox-message';

export interface CaptureServer {
  port: number;
  close: () => Promise<void>;
}

function addressText(a: AddressObject | AddressObject[] | undefined): string | null {
  if (!a) return null;
  return (Array.isArray(a) ? a : [a]).map((x) => x.text).join(', ');
}

/**
 * A real SMTP server on the loopback interface that keeps every message it is
 * given in outbox_messages instead of relaying it. Rholog starts it when no
 * SMTP_URL is set, so mail works on a fresh machine and admins can read it.
 */
export async function startCaptureServer(options: { port: number; log: (m: string) => void }): Promise<CaptureServer> {
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ['AUTH', 'STARTTLS'],
    banner: 'Rholog capture server',
    size: 10 * 1024 * 1024,
    logger: false,
    onData(stream, session, callback) {
      simpleParser(stream)
        .then(async (mail) => {
          const receivedAt = new Date();
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
    close: () => new Promise<void>((resolve) => server.close(() => resolve())),
  };
}
