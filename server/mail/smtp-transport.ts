import { createTransport } from 'nodemailer';
import type { MailConfig } from '../config';

/** One message as the mail module sends it: plain text, and attachments by name. */
export interface MailMessage {
  to: string[];
  subject: string;
  text: string;
  attachments?: { filename: string; content: Buffer | string; contentType?: string }[];
}

/** Where mail goes (an SMTP server; tests may put anything here). */
export interface MailTransport {
  send(message: MailMessage): Promise<void>;
  close(): void;
}

/**
 * An SMTP transport (nodemailer) for the configured server. Bodies go base64-encoded, so lines and characters arrive
 * exactly as written whatever the relays do. Short timeouts: a slow or absent server fails the attempt, and the mail
 * service tries again later.
 */
export function smtpTransport(cfg: MailConfig): MailTransport {
  const transport = createTransport({
    host: cfg.host,
    port: cfg.port,
    secure: cfg.secure,
    ...(cfg.auth ? { auth: cfg.auth } : {}),
    connectionTimeout: 10_000,
    greetingTimeout: 10_000,
    socketTimeout: 20_000,
  });
  return {
    async send(m) {
      await transport.sendMail({
        from: cfg.from,
        to: m.to,
        subject: m.subject,
        text: m.text,
        textEncoding: 'base64',
        attachments: m.attachments,
      });
    },
    close: () => transport.close(),
  };
}
