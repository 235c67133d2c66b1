import type { MailStatus, OutboxMessage } from '../../shared/contracts/mail';
import type { Db } from './db';

export interface NewOutboxRow {
  kind: string;
  to: string[];
  subject: string;
  body: string;
  attachments: string[];
  createdAt: Date;
}

const json = <T>(v: unknown): T => (typeof v === 'string' ? (JSON.parse(v) as T) : (v as T));

/** The mail outbox: each message with its delivery status and attempts. */
export class MailOutboxRepository {
  constructor(private readonly db: Db) {}

  async insert(m: NewOutboxRow): Promise<number> {
    const [id] = await this.db('mail_outbox').insert({
      kind: m.kind,
      to_addresses: m.to.join(', ').slice(0, 2000),
      subject: m.subject.slice(0, 300),
      body: m.body,
      attachments: JSON.stringify(m.attachments),
      status: 'queued',
      attempts: 0,
      created_at: m.createdAt,
    });
    return id!;
  }

  /** One more try: still queued (with its error) or, when `final`, failed. */
  async attemptFailed(id: number, error: string, final: boolean): Promise<void> {
    await this.db('mail_outbox')
      .where({ id })
      .update({ status: final ? 'failed' : 'queued', last_error: error.slice(0, 1000), attempts: this.db.raw('attempts + 1') });
  }

  async sent(id: number, at: Date): Promise<void> {
    await this.db('mail_outbox')
      .where({ id })
      .update({ status: 'sent', sent_at: at, attempts: this.db.raw('attempts + 1') });
  }

  /** Messages still queued (a restart interrupted them), oldest first. */
  async queued(limit = 500): Promise<OutboxMessage[]> {
    return (await this.db('mail_outbox').where({ status: 'queued' }).orderBy('id').limit(limit)).map(toView);
  }

  async list(f: { status?: MailStatus; limit: number }): Promise<OutboxMessage[]> {
    const q = this.db('mail_outbox').orderBy('id', 'desc').limit(f.limit);
    if (f.status) q.where({ status: f.status });
    return (await q).map(toView);
  }

  async get(id: number): Promise<OutboxMessage | undefined> {
    const r = await this.db('mail_outbox').where({ id }).first();
    return r ? toView(r) : undefined;
  }
}

// eslint-disable-next-line @typescript-eslint/no-explicit-any -- a row straight from the driver
function toView(r: any): OutboxMessage {
  return {
    id: r.id,
    kind: r.kind,
    to: String(r.to_addresses)
      .split(',')
      .map((s) => s.trim())
      .filter(Boolean),
    subject: r.subject,
    body: r.body,
    attachments: json<string[]>(r.attachments),
    status: r.status,
    attempts: r.attempts,
    lastError: r.last_error,
    createdAt: (r.created_at as Date).toISOString(),
    sentAt: r.sent_at ? (r.sent_at as Date).toISOString() : null,
  };
}
