import type { Logger } from 'pino';
import { STATEMENT_LOCK_DAY, STATEMENT_LOCK_HOUR, type MonthlyStatement } from '../../shared/contracts/statements';
import { localMidnightUtcMs, monthOfInstant, nextMonthOf, previousMonthOf, zoneOffsetMs } from '../../shared/pv-performance';
import { StatementLockRace, type StatementLockRepository } from '../data/statement-lock-repository';
import { conflict } from '../errors/app-error';
import type { AuditService } from './audit-service';
import type { Caller } from './caller';
import type { MailService } from './mail-service';
import { statementChecksum, statementContent } from './statement-checksum';
import { statementPdf } from './statement-pdf';
import type { StatementService } from './statement-service';

export interface StatementLockOptions {
  now: () => number;
  /** How often the lock job looks for months that are due [ms]. */
  intervalMs: number;
}

export const DEFAULT_STATEMENT_LOCK_OPTIONS: StatementLockOptions = { now: Date.now, intervalMs: 5 * 60_000 };

/** How far back the lock job looks: the newest due month and the eleven before it (a year of statements). */
export const LOCK_LOOKBACK_MONTHS = 12;

/** The lock job acts as the system: staff scope (every site), no person. */
const SYSTEM: Caller = { id: 0, role: 'admin', ownerId: null };

/** The instant a month locks: the 3rd of the next month at 06:00 wall time in the zone. */
export function lockInstantMs(month: string, timeZone: string): number {
  const midnight = localMidnightUtcMs(`${nextMonthOf(month)}-0${STATEMENT_LOCK_DAY}`, timeZone);
  const guess = midnight + STATEMENT_LOCK_HOUR * 3600_000;
  // A daylight-saving change between midnight and 06:00 moves the wall clock: correct by the change of offset.
  return guess + zoneOffsetMs(midnight, timeZone) - zoneOffsetMs(guess, timeZone);
}

/** The newest month that is due to be locked at `nowMs` in a zone. */
export function newestDueMonth(nowMs: number, timeZone: string): string {
  const previous = previousMonthOf(monthOfInstant(nowMs, timeZone));
  return nowMs >= lockInstantMs(previous, timeZone) ? previous : previousMonthOf(previous);
}

export interface LockedMonth {
  siteId: number;
  month: string;
  mailed: boolean;
}

export interface SweepOptions {
  /**
   * Leave each site's newest due month for the server's job to lock and mail (the demo's seeding step locks the past
   * before the server starts, silently).
   */
  leaveNewest?: boolean;
}

/**
 * The monthly lock. A timer (one per server) locks each site's due months: every month of the last twelve due ones
 * (from the site's first data on) that has no locked version yet; older months stay computed on request. The newest due month is mailed to the owner's contact with the
 * PDF attached; older months (a server that was down, the demo's past) lock silently, so a fresh start never mails
 * the whole past. Each lock stores the statement's canonical JSON and its SHA-256. Late data for a locked month
 * (buckets the rollup worker rewrites after the lock) marks it "restatement suggested"; engineers and admins restate
 * with a reason, which stores the next version and marks the earlier one superseded.
 */
export class StatementLockService {
  private readonly opts: StatementLockOptions;
  private timer: NodeJS.Timeout | undefined;
  private running: Promise<unknown> | undefined;
  private readonly pending = new Set<Promise<unknown>>();
  /** Locked months in force: `site|month` → restatement already suggested. */
  private locked = new Map<string, boolean>();

  constructor(
    private readonly repo: StatementLockRepository,
    private readonly statements: StatementService,
    private readonly mail: Pick<MailService, 'send'> | null,
    private readonly audit: Pick<AuditService, 'record'> | null,
    private readonly unitSite: (unitId: number) => { siteId: number; timeZone: string } | undefined,
    private readonly log: Logger,
    opts: Partial<StatementLockOptions> = {},
  ) {
    this.opts = { ...DEFAULT_STATEMENT_LOCK_OPTIONS, ...opts };
  }

  /** Starts the job: a sweep now, then one every `intervalMs`. */
  start(): void {
    const run = () => void this.sweep().catch((err) => this.log.error({ err }, 'statement lock sweep failed'));
    run();
    this.timer = setInterval(run, this.opts.intervalMs);
    this.timer.unref();
  }

  stop(): void {
    clearInterval(this.timer);
  }

  /** Waits for a sweep and the late-data marks under way (tests; the stop). */
  async settle(): Promise<void> {
    while (this.running || this.pending.size) await Promise.all([this.running, ...this.pending]);
  }

  /** Locks every due month; one sweep at a time. */
  sweep(opts: SweepOptions = {}): Promise<LockedMonth[]> {
    const run = (async () => {
      while (this.running) await this.running.catch(() => undefined);
      const p = this.lockDue(opts);
      this.running = p;
      try {
        return await p;
      } finally {
        this.running = undefined;
      }
    })();
    return run;
  }

  private async lockDue(opts: SweepOptions): Promise<LockedMonth[]> {
    const nowMs = this.opts.now();
    await this.reload();
    const out: LockedMonth[] = [];
    for (const site of await this.repo.sitesWithData()) {
      if (site.firstMs === null) continue;
      const newest = newestDueMonth(nowMs, site.timeZone);
      const last = opts.leaveNewest ? previousMonthOf(newest) : newest;
      let first = newest;
      for (let i = 1; i < LOCK_LOOKBACK_MONTHS; i++) first = previousMonthOf(first);
      const firstData = monthOfInstant(site.firstMs, site.timeZone);
      for (let m = firstData > first ? firstData : first; m <= last; m = nextMonthOf(m)) {
        if (this.locked.has(`${site.siteId}|${m}`)) continue;
        const mailed = !opts.leaveNewest && m === newest;
        try {
          const s = await this.store(SYSTEM, site.siteId, m, 0, null, !mailed, nowMs);
          out.push({ siteId: site.siteId, month: m, mailed });
          if (mailed) await this.mailLocked(s);
        } catch (err) {
          if (err instanceof StatementLockRace) continue; // another process locked it first
          this.log.error({ err, siteId: site.siteId, month: m }, 'statement not locked');
        }
      }
    }
    return out;
  }

  private async reload(): Promise<void> {
    this.locked = new Map((await this.repo.lockedMonths()).map((l) => [`${l.siteId}|${l.month}`, l.suggested]));
  }

  /** Computes the month now and stores it as the next version after `expected`. */
  private async store(
    c: Caller,
    siteId: number,
    month: string,
    expected: number,
    reason: string | null,
    silent: boolean,
    atMs: number,
  ): Promise<MonthlyStatement> {
    const s = await this.statements.compute(SYSTEM, siteId, month);
    const content = statementContent(s);
    await this.repo.insertVersion(
      { siteId, month, content, checksum: statementChecksum(content), lockedAt: new Date(atMs), lockedBy: c.id || null, reason, silent },
      expected,
    );
    this.locked.set(`${siteId}|${month}`, false);
    return this.statements.statement(SYSTEM, siteId, month);
  }

  /** A new version of a locked month with the reason (engineers and admins; the route checks the role). */
  async restate(c: Caller, siteId: number, month: string, reason: string): Promise<MonthlyStatement> {
    const current = await this.statements.statement(c, siteId, month);
    if (!current.lock)
      throw conflict(
        `${month} is not locked yet: a month locks on the ${STATEMENT_LOCK_DAY}rd of the next month at 0${STATEMENT_LOCK_HOUR}:00 site time.`,
      );
    let s: MonthlyStatement;
    try {
      s = await this.store(c, current.siteId, month, current.lock.version, reason, true, this.opts.now());
    } catch (err) {
      if (err instanceof StatementLockRace) throw conflict(`${month} was restated by someone else meanwhile: reload it and try again.`);
      throw err;
    }
    await this.audit?.record(c, 'statement-restate', `site:${s.siteId}`, { month, version: s.lock!.version, reason });
    return s;
  }

  /**
   * The rollup worker rewrote these 15-minute buckets (bucket start → unit ids): any that falls in a locked month of
   * its site marks that month "restatement suggested" (data that arrived after the lock).
   */
  onQuartersRolled(quarters: ReadonlyMap<number, ReadonlySet<number>>): void {
    if (!this.locked.size) return;
    const hits = new Set<string>();
    for (const [q, ids] of quarters)
      for (const id of ids) {
        const u = this.unitSite(id);
        if (!u) continue;
        const key = `${u.siteId}|${monthOfInstant(q, u.timeZone)}`;
        if (this.locked.get(key) === false) hits.add(key);
      }
    for (const key of hits) {
      this.locked.set(key, true);
      const [siteId, month] = key.split('|') as [string, string];
      const p = this.repo
        .markSuggested(Number(siteId), month, new Date(this.opts.now()))
        .then((marked) => marked && this.log.info({ siteId: Number(siteId), month }, 'late data for a locked month: restatement suggested'))
        .catch((err) => this.log.error({ err, siteId, month }, 'restatement suggestion not stored'))
        .finally(() => this.pending.delete(p));
      this.pending.add(p);
    }
  }

  /**
   * A site's survey changed: its locked months stay as they are (a statement keeps the model it was made with) and are
   * marked "restatement suggested", so an engineer decides whether to restate them with the new survey.
   */
  onSurveyChanged(siteId: number): void {
    const p = this.suggestForSite(siteId)
      .catch((err) => this.log.error({ err, siteId }, 'restatement suggestion not stored'))
      .finally(() => this.pending.delete(p));
    this.pending.add(p);
  }

  private async suggestForSite(siteId: number): Promise<number> {
    let n = 0;
    for (const m of await this.repo.lockedMonths(siteId)) {
      if (m.suggested) continue;
      if (await this.repo.markSuggested(siteId, m.month, new Date(this.opts.now()))) n++;
      this.locked.set(`${siteId}|${m.month}`, true);
    }
    if (n) this.log.info({ siteId, months: n }, 'survey changed: restatements suggested for the locked months');
    return n;
  }

  /** Mails a locked statement with its PDF to the owner's contact addresses (through the mail module's outbox). */
  private async mailLocked(s: MonthlyStatement): Promise<void> {
    if (!this.mail) return;
    const to = await this.repo.ownerContacts(s.siteId);
    if (!to.length) {
      this.log.warn({ siteId: s.siteId, month: s.month }, 'statement locked; the owner has no contact address to mail it to');
      return;
    }
    const f = s.site;
    const p = (x: number | null) => (x === null ? 'not computable' : x.toFixed(3));
    const pc = (x: number | null) => (x === null ? 'not computable' : `${(x * 100).toFixed(1)} %`);
    const text = [
      `The statement of ${s.siteName} for ${s.month} (${s.timeZone}) is locked (version ${s.lock!.version}).`,
      '',
      `Energy: ${f.energyKwh.toFixed(1)} kWh (DC, as measured by the units)`,
      `Final yield Yf: ${f.yfH === null ? 'not computable' : f.yfH.toFixed(2)} kWh/kWp`,
      `Performance ratio PR: ${p(f.pr)}; temperature-corrected: ${p(f.prStc)}`,
      `Availability (contractual): time ${pc(f.availability.timeContractual)}, energy ${pc(f.availability.energyContractual)}`,
      `Data completeness: ${pc(f.completeness)}`,
      '',
      'The full statement is attached as PDF. Its content has the SHA-256 checksum',
      s.lock!.checksum,
      'Data that arrives later for this month does not change it; if it matters, the statement is restated as a new version.',
    ].join('\n');
    await this.mail.send('statement', {
      to,
      subject: `Monthly statement: ${s.siteName}, ${s.month}`,
      text,
      attachments: [
        { filename: `statement-site-${s.siteId}-${s.month}.pdf`, content: await statementPdf(s), contentType: 'application/pdf' },
      ],
    });
  }
}
