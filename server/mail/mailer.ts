import nodemailer, { type Transporter } from 'nodemailer';

export interface OutgoingMail {
  to: string;
  subject: string;
  text: string;
  html?: string | null;
  headers?: Record<string, string>;
  /** The Message-ID header, "<local@domain>": the same on every try of one notification, so receivers can drop a repeat. */
  messageId?: string;
}

export interface Mailer {
  /** Where mail goes, without credentials: for logs and the admin page. */
  describe: string;
  send: (mail: OutgoingMail) => Promise<{ messageId: string }>;
  close: () => void;
}

/** nodemailer over SMTP: to SMTP_URL when set, otherwise to the local capture server. */
export function createMailer(options: { from: string; smtpUrl?: string; capture?: { port: number; auth: { user: string; pass: string } } }): Mailer {
  let transport: Transporter;
  let describe: string;
  const timeouts = { connectionTimeout: 10_000, greetingTimeout: 10_000, socketTimeout: 30_000 };
  if (options.smtpUrl) {
    const url = new URL(options.smtpUrl);
    describe = `${url.protocol}//${url.hostname}:${url.port || (url.protocol === 'smtps:' ? 465 : 587)}`;
    transport = nodemailer.createTransport({
      host: url.hostname,
      port: url.port ? Number(url.port) : url.protocol === 'smtps:' ? 465 : 587,
      secure: url.protocol === 'smtps:',
      auth: url.username ? { user: decodeURIComponent(url.username), pass: decodeURIComponent(url.password) } : undefined,
      ...timeouts,
    });
  } else if (options.capture) {
    describe = `capture server on 127.0.0.1:${options.capture.port}`;
    transport = nodemailer.createTransport({
      host: '127.0.0.1',
      port: options.capture.port,
      secure: false,
      ignoreTLS: true,
      auth: { user: options.capture.auth.user, pass: options.capture.auth.pass },
      ...timeouts,
    });
  } else {
    throw new Error('The mailer needs SMTP_URL or a capture server port.');
  }
  return {
    describe,
    send: async (mail) => {
      const info = await transport.sendMail({
        from: options.from,
        to: mail.to,
        subject: mail.subject,
        text: mail.text,
        html: mail.html ?? undefined,
        headers: mail.headers,
        ...(mail.messageId ? { messageId: mail.messageId } : {}),
      });
      return { messageId: String(info.messageId ?? '') };
    },
    close: () => transport.close(),
  };
}
