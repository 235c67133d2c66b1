import type { Logger } from 'pino';
import type { MailStatus, OutboxMessage } from '../../shared/contracts/mail';
import type { MailOutboxRepository } from '../data/mail-outbox-repository';
import type { MailMessage, MailTransport } from '../mail/smtp-transport';

export interface MailOptions {
  /** Tries per message before it counts as failed. */
  attempts: number;
  /** Wait before try `n + 1` after try `n` failed [ms]. */
  backoffMs: (attempt: number) => number;
  now: () => number;
}

/** 30 s, 2 min, 8 min, … capped at an hour. */
export const DEFAULT_MAIL_OPTIONS: MailOptions = {
  attempts: 4,
  backoffMs: (n) => Math.min(3600_000, 30_000 * 4 ** (n - 1)),
  now: Date.now,
};

/**
 * The mail module: every message is stored in the outbox first (queued), then handed to the mail server in the
 * background, tried again with a growing wait when it fails, and marked sent or failed. Sending never throws for a
 * delivery problem, so whatever caused a message (a ticket move, a request) never fails because of mail.
 */
export class MailService {
  private readonly opts: MailOptions;
  private readonly timers = new Set<NodeJS.Timeout>();
  private readonly inFlight = new Set<Promise<void>>();
  private stopped = false;

  constructor(
    private readonly repo: MailOutboxRepository,
    private readonly transport: MailTransport,
    private readonly log: Logger,
    opts: Partial<MailOptions> = {},
  ) {
    this.opts = { ...DEFAULT_MAIL_OPTIONS, ...opts };
  }

  /** Stores the message and starts its delivery; resolves with its outbox id once it is stored. */
  async send(kind: string, m: MailMessage): Promise<number> {
    const id = await this.repo.insert({
      kind,
      to: m.to,
      subject: m.subject,
      body: m.text,
      attachments: (m.attachments ?? []).map((a) => a.filename),
      createdAt: new Date(this.opts.now()),
    });
    this.attempt(id, m, 1);
    return id;
  }

  /** Messages a restart left queued are tried again (their attachments are not kept, so those are marked failed). */
  async resume(): Promise<void> {
    for (const q of await this.repo.queued()) {
      if (q.attachments.length) {
        await this.repo.attemptFailed(q.id, 'The server restarted before this message went out; its attachments were not kept.', true);
        continue;
      }
      this.attempt(q.id, { to: q.to, subject: q.subject, text: q.body }, q.attempts + 1);
    }
  }

  async outbox(f: { status?: MailStatus; limit: number }): Promise<OutboxMessage[]> {
    return this.repo.list(f);
  }

  /** Waits until no try is under way (tests; the stop). Retries still waiting for their time are not waited for. */
  async settle(): Promise<void> {
    while (this.inFlight.size) await Promise.all([...this.inFlight]);
  }

  stop(): void {
    this.stopped = true;
    for (const t of this.timers) clearTimeout(t);
    this.timers.clear();
    this.transport.close();
  }

  private attempt(id: number, m: MailMessage, n: number): void {
    if (this.stopped) return;
    const run = this.tryOnce(id, m, n).finally(() => this.inFlight.delete(run));
    this.inFlight.add(run);
  }

  private async tryOnce(id: number, m: MailMessage, n: number): Promise<void> {
    try {
      await this.transport.send(m);
    } catch (err) {
      const final = n >= this.opts.attempts;
      const text = (err as Error).message || String(err);
      await this.repo
        .attemptFailed(id, text, final)
        .catch((e: unknown) => this.log.error({ err: e, outboxId: id }, 'mail outbox not updated'));
      if (final) {
        this.log.warn({ outboxId: id, attempts: n, error: text }, 'mail not delivered; giving up');
        return;
      }
      this.log.info({ outboxId: id, attempt: n, error: text }, 'mail not delivered; trying again later');
      const t = setTimeout(() => {
        this.timers.delete(t);
        this.attempt(id, m, n + 1);
      }, this.opts.backoffMs(n));
      t.unref();
      this.timers.add(t);
      return;
    }
    await this.repo
      .sent(id, new Date(this.opts.now()))
      .catch((e: unknown) => this.log.error({ err: e, outboxId: id }, 'mail outbox not updated'));
  }
}
