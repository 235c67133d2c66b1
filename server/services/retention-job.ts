import type { Logger } from 'pino';

/** The raw telemetry table's monthly partitions (server/data/telemetry-partitions.ts). */
export interface RawPartitionsPort {
  ensureAhead(untilMs: number): Promise<string[]>;
  dropBefore(cutoff: Date): Promise<{ dropped: string[]; strayRows: number }>;
}

/** Months made ahead of the current one, so a new month's rows never wait for a partition (they would land in p_future). */
export const MONTHS_AHEAD = 3;

/**
 * Hourly: makes the raw telemetry's partitions for the next months, then drops the months wholly older than the
 * retention (a month stays until all of it is past; rollups are kept: they are what long-range reads use). Runs on one
 * server at a time (server/services/leadership.ts).
 */
export class RetentionJob {
  private timer: NodeJS.Timeout | undefined;
  /** One upkeep at a time (two would both try to split or drop the same partition). */
  private running: Promise<unknown> = Promise.resolve();

  constructor(
    private readonly partitions: RawPartitionsPort,
    private readonly retentionDays: number,
    private readonly log: Logger,
    private readonly now: () => number = Date.now,
  ) {}

  start(intervalMs = 3600_000): void {
    const run = () => void this.runOnce().catch((err) => this.log.error({ err }, 'raw telemetry partition upkeep failed'));
    run();
    this.timer = setInterval(run, intervalMs);
    this.timer.unref();
  }

  stop(): void {
    clearInterval(this.timer);
  }

  runOnce(): Promise<{ added: string[]; dropped: string[]; strayRows: number }> {
    const run = this.running.catch(() => undefined).then(() => this.upkeep());
    this.running = run;
    return run;
  }

  private async upkeep(): Promise<{ added: string[]; dropped: string[]; strayRows: number }> {
    const now = this.now();
    const ahead = new Date(now);
    ahead.setUTCMonth(ahead.getUTCMonth() + MONTHS_AHEAD, 1);
    const added = await this.partitions.ensureAhead(ahead.getTime());
    const cutoff = new Date(now - this.retentionDays * 86_400_000);
    const { dropped, strayRows } = await this.partitions.dropBefore(cutoff);
    if (added.length) this.log.info({ added }, 'raw telemetry partitions made for the coming months');
    if (dropped.length || strayRows)
      this.log.info({ dropped, strayRows, cutoff: cutoff.toISOString() }, 'raw telemetry past retention dropped');
    return { added, dropped, strayRows };
  }
}
