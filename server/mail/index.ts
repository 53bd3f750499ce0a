import type { AppConfig } from '../config';
import { startCaptureServer, type CaptureServer } from './capture-server';
import { createMailer, type Mailer } from './mailer';
import { MailQueue, messageIdDomain } from './mail-queue';

export interface MailSystem {
  queue: MailQueue;
  mailer: Mailer;
  /** The capture server's port, or null when SMTP_URL sends mail to a real relay. */
  capturePort: number | null;
  /** The capture server's generated sign-in (null with SMTP_URL); kept in memory only. */
  captureAuth: { user: string; pass: string } | null;
  close: () => Promise<void>;
}

/**
 * Mail for one running app: the capture server (unless SMTP_URL is set), the
 * nodemailer transport and the send queue's background worker.
 */
export async function startMail(config: AppConfig, log: (m: string) => void): Promise<MailSystem> {
  let capture: CaptureServer | null = null;
  if (!config.smtpUrl) {
    capture = await startCaptureServer({ port: config.captureSmtpPort, log });
    log(`Mail is captured locally (SMTP on 127.0.0.1:${capture.port}); admins read it on the Outbox page.`);
  }
  const mailer = createMailer({ from: config.mailFrom, smtpUrl: config.smtpUrl, capture: capture ?? undefined });
  const queue = new MailQueue(mailer, {
    retryBaseMs: config.mailRetryBaseMs,
    maxAttempts: config.mailMaxAttempts,
    log,
    messageIdDomain: messageIdDomain(config.mailFrom),
  });
  queue.start();
  return {
    queue,
    mailer,
    capturePort: capture?.port ?? null,
    captureAuth: capture?.auth ?? null,
    close: async () => {
      await queue.stop();
      mailer.close();
      await capture?.close();
    },
  };
}

/** An absolute link into the client for e-mails: PUBLIC_URL, or this server on localhost. */
export function appLink(config: AppConfig, path: string): string {
  const base = (config.publicUrl ?? `http://localhost:${config.port}`).replace(/\/+$/, '');
  return `${base}${path.startsWith('/') ? path : `/${path}`}`;
}

export { MailQueue, messageIdDomain, messageIdOf, retryDelayMs, type MailJobInput } from './mail-queue';
