import type { Logger } from 'pino';
import type { TelemetryRepository } from '../data/telemetry-repository';

/** Deletes raw telemetry older than the retention, hourly. Rollups are kept: they are what long-range reads use. */
export class RetentionJob {
  private timer: NodeJS.Timeout | undefined;

  constructor(
    private readonly repo: TelemetryRepository,
    private readonly retentionDays: number,
    private readonly log: Logger,
    private readonly now: () => number = Date.now,
  ) {}

  start(intervalMs = 3600_000): void {
    this.timer = setInterval(() => void this.runOnce().catch((err) => this.log.error({ err }, 'retention purge failed')), intervalMs);
    this.timer.unref();
  }

  stop(): void {
    clearInterval(this.timer);
  }

  async runOnce(): Promise<number> {
    const cutoff = new Date(this.now() - this.retentionDays * 86_400_000);
    const n = await this.repo.purgeRawBefore(cutoff);
    if (n) this.log.info({ rows: n, cutoff: cutoff.toISOString() }, 'raw telemetry past retention deleted');
    return n;
  }
}
