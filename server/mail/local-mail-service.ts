import { mkdirSync, writeFileSync } from 'node:fs';
import type { AddressInfo } from 'node:net';
import { join } from 'node:path';
import { SMTPServer } from 'smtp-server';

/** A message the local mail service received: the SMTP envelope, the raw message and its plain-text body. */
export interface ReceivedMail {
  from: string;
  /** Envelope recipients (RCPT TO), as the SMTP client gave them. */
  to: string[];
  subject: string;
  /** The decoded body of a single-part text message (what the mail module sends); the raw text otherwise. */
  text: string;
  raw: string;
  receivedAt: Date;
}

export interface LocalMailServiceOptions {
  host?: string;
  /** 0 picks a free port. */
  port?: number;
  /** Also store each message as an .eml file (and an index line) here. */
  dir?: string;
  /** Refuse every message with this SMTP error text (a failing mail server, for tests). */
  refuseWith?: string;
}

export interface LocalMailService {
  readonly port: number;
  readonly messages: ReceivedMail[];
  /** Refuse (a text) or accept (null) messages from now on. */
  refuse(text: string | null): void;
  close(): Promise<void>;
}

/** Header value of a raw message (unfolded); encoded words are left as they are. */
function header(head: string, name: string): string {
  const unfolded = head.replace(/\r?\n[ \t]+/g, ' ');
  const line = unfolded.split(/\r?\n/).find((l) => l.toLowerCase().startsWith(`${name.toLowerCase()}:`));
  return line ? line.slice(name.length + 1).trim() : '';
}

function bodyText(raw: string): { subject: string; text: string } {
  const split = raw.search(/\r?\n\r?\n/);
  const head = split < 0 ? raw : raw.slice(0, split);
  const body = split < 0 ? '' : raw.slice(split).replace(/^\r?\n\r?\n/, '');
  const subject = header(head, 'Subject');
  const encoding = header(head, 'Content-Transfer-Encoding').toLowerCase();
  const single = !/^multipart\//i.test(header(head, 'Content-Type'));
  // The mail module's text goes base64, or as plain 7-bit lines when it is short ASCII (the SMTP framing adds a last CRLF).
  const text = !single
    ? body
    : encoding === 'base64'
      ? Buffer.from(body.replace(/\s+/g, ''), 'base64').toString('utf8')
      : body.replace(/\r\n/g, '\n').replace(/\n$/, '');
  return { subject, text };
}

/**
 * The project's own mail service for development and tests (the `smtp-server` package), on loopback: it receives every
 * message the server sends, so nothing leaves the machine. Plain SMTP, no authentication, no STARTTLS.
 */
export async function startLocalMailService(opts: LocalMailServiceOptions = {}): Promise<LocalMailService> {
  const messages: ReceivedMail[] = [];
  let refuseWith = opts.refuseWith ?? null;
  if (opts.dir) mkdirSync(opts.dir, { recursive: true });
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ['AUTH', 'STARTTLS'],
    logger: false,
    size: 25 * 1024 * 1024,
    onRcptTo(_address, _session, callback) {
      if (refuseWith) {
        const err = Object.assign(new Error(refuseWith), { responseCode: 451 });
        return callback(err);
      }
      callback();
    },
    onData(stream, session, callback) {
      const chunks: Buffer[] = [];
      stream.on('data', (c: Buffer) => chunks.push(c));
      stream.on('end', () => {
        const raw = Buffer.concat(chunks).toString('utf8');
        const mail: ReceivedMail = {
          from: session.envelope.mailFrom ? session.envelope.mailFrom.address : '',
          to: session.envelope.rcptTo.map((r) => r.address),
          ...bodyText(raw),
          raw,
          receivedAt: new Date(),
        };
        messages.push(mail);
        if (opts.dir) {
          const name = `${mail.receivedAt.toISOString().replace(/[:.]/g, '-')}-${messages.length}.eml`;
          writeFileSync(join(opts.dir, name), raw);
          writeFileSync(
            join(opts.dir, 'index.jsonl'),
            `${JSON.stringify({ file: name, to: mail.to, subject: mail.subject, at: mail.receivedAt })}\n`,
            { flag: 'a' },
          );
        }
        callback();
      });
    },
  });
  await new Promise<void>((res, rej) => {
    server.once('error', rej);
    server.listen(opts.port ?? 0, opts.host ?? '127.0.0.1', () => res());
  });
  server.on('error', () => undefined);
  const { port } = (server.server as { address(): AddressInfo }).address();
  return {
    port,
    messages,
    refuse: (text) => {
      refuseWith = text;
    },
    close: () => new Promise<void>((res) => server.close(() => res())),
  };
}
