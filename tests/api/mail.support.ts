import type { AddressInfo } from 'node:net';
import net from 'node:net';
import { simpleParser, type ParsedMail } from 'mailparser';
import { SMTPServer } from 'smtp-server';

/** Poll until check() returns a value (not undefined/false), or fail after timeoutMs. */
export async function eventually<T>(check: () => Promise<T | undefined | false | null>, what: string, timeoutMs = 10_000): Promise<T> {
  const deadline = Date.now() + timeoutMs;
  let last: unknown;
  for (;;) {
    try {
      const v = await check();
      if (v !== undefined && v !== false && v !== null) return v;
    } catch (err) {
      last = err;
    }
    if (Date.now() > deadline) throw new Error(`Timed out waiting for ${what}${last ? `: ${String(last)}` : ''}`);
    await new Promise((r) => setTimeout(r, 50));
  }
}

export interface TestRelay {
  url: string;
  /** How many DATA commands it refused, how many messages it accepted. */
  refused: number;
  received: ParsedMail[];
  close: () => Promise<void>;
}

/**
 * A local SMTP relay that refuses the first `refuseFirst` messages (those
 * whose subject matches `only`, when given) with a 451, then accepts.
 */
export async function startFlakyRelay(refuseFirst: number, only?: RegExp): Promise<TestRelay> {
  const relay: TestRelay = { url: '', refused: 0, received: [], close: async () => undefined };
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ['AUTH', 'STARTTLS'],
    logger: false,
    onData(stream, _session, callback) {
      simpleParser(stream).then((mail) => {
        if (relay.refused < refuseFirst && (!only || only.test(mail.subject ?? ''))) {
          relay.refused += 1;
          callback(Object.assign(new Error('Relay busy, try later'), { responseCode: 451 }));
          return;
        }
        relay.received.push(mail);
        callback();
      }, callback);
    },
  });
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', () => resolve()));
  relay.url = `smtp://127.0.0.1:${(server.server.address() as AddressInfo).port}`;
  relay.close = () => new Promise<void>((resolve) => server.close(() => resolve()));
  return relay;
}

/** A loopback port with nothing listening on it (taken, then released). */
export async function closedPort(): Promise<number> {
  const s = net.createServer();
  await new Promise<void>((resolve) => s.listen(0, '127.0.0.1', () => resolve()));
  const port = (s.address() as AddressInfo).port;
  await new Promise<void>((resolve) => s.close(() => resolve()));
  return port;
}
