import type { Logger } from 'pino';

/** The lock one server at a time holds (server/data/leader-lock.ts). */
export interface LeaderLockPort {
  readonly name: string;
  acquire(waitS: number): Promise<boolean>;
  held(timeoutMs: number): Promise<boolean>;
  release(): Promise<void>;
  /** The session holding the lock ended without a release. */
  onLost(listener: () => void): void;
}

/** A job that must run on one server at a time: started when this server leads, stopped when it stops leading. */
export interface OnceJob {
  name: string;
  start(): void | Promise<void>;
  stop(): void | Promise<void>;
}

export interface LeadershipOptions {
  /** How often the leader checks that it still holds the lock [ms]. */
  heartbeatMs: number;
  /** How long a heartbeat may take before the leader gives up leading [ms]. */
  heartbeatTimeoutMs: number;
  /** How long one wait for the lock lasts before it is asked again [s] (a free lock is taken at once). */
  waitS: number;
  /** Pause after the database could not be reached [ms]. */
  retryMs: number;
}

/**
 * The lock's session is dropped by the database after this long without a heartbeat [s]. It is longer than the time
 * a leader that cannot reach the database needs to notice and stop its jobs (heartbeat + its timeout), so two servers
 * never run the jobs at once.
 */
export const lockLostAfterS = (o: LeadershipOptions): number => Math.ceil((2 * o.heartbeatMs + o.heartbeatTimeoutMs) / 1000);

export const DEFAULT_LEADERSHIP_OPTIONS: LeadershipOptions = { heartbeatMs: 5000, heartbeatTimeoutMs: 3000, waitS: 5, retryMs: 2000 };

/**
 * Runs the jobs that must run once (retention, comms watch, ticket timers, digests, the monthly statement lock and its
 * mail) on whichever server holds the lock. A server that dies frees the lock at once and a waiting server takes the
 * jobs over within moments; one that hangs or loses the database stops its jobs within `heartbeatMs +
 * heartbeatTimeoutMs`, and the others take over once the database drops its session (`lockLostAfterS`).
 */
export class Leadership {
  private readonly jobs: OnceJob[] = [];
  private leading = false;
  private running = false;
  private loop: Promise<void> | undefined;
  private wake: (() => void) | undefined;
  private readonly changeListeners: ((leading: boolean) => void)[] = [];
  private readonly opts: LeadershipOptions;

  constructor(
    private readonly lock: LeaderLockPort,
    private readonly log: Logger,
    opts: Partial<LeadershipOptions> = {},
  ) {
    this.opts = { ...DEFAULT_LEADERSHIP_OPTIONS, ...opts };
    // The database ended the session (or it broke): the jobs stop now, not at the next heartbeat.
    lock.onLost(() => {
      if (this.leading) void this.stepDown('lock session ended').finally(() => this.wake?.());
    });
  }

  add(job: OnceJob): void {
    this.jobs.push(job);
  }

  get isLeader(): boolean {
    return this.leading;
  }

  onChange(listener: (leading: boolean) => void): void {
    this.changeListeners.push(listener);
  }

  /** Takes the lock if it is free (resolves after that first try, so a lone server leads from its first moment), then keeps trying. */
  async start(): Promise<void> {
    if (this.running) return;
    this.running = true;
    await this.attempt(0);
    this.loop = this.run();
  }

  /** Stops the jobs, gives up the lock (another server takes over at once) and stops trying. */
  async stop(): Promise<void> {
    this.running = false;
    this.wake?.();
    // A follower's wait for the lock is cut short rather than waited out.
    if (!this.leading) await this.lock.release();
    await this.loop;
    await this.stepDown('stopping');
  }

  private async run(): Promise<void> {
    while (this.running) {
      if (!this.leading) {
        if (!(await this.attempt(this.opts.waitS))) await this.pause(this.opts.retryMs, true);
        continue;
      }
      await this.pause(this.opts.heartbeatMs, false);
      if (!this.running || !this.leading) continue;
      let still: boolean;
      try {
        still = await this.lock.held(this.opts.heartbeatTimeoutMs);
      } catch (err) {
        this.log.warn({ err, lock: this.lock.name }, 'leader heartbeat failed');
        still = false;
      }
      if (!still) await this.stepDown('lock lost');
    }
  }

  /** One try for the lock; false only when the database could not be asked (the caller waits before the next). */
  private async attempt(waitS: number): Promise<boolean> {
    let got: boolean;
    try {
      got = await this.lock.acquire(waitS);
    } catch (err) {
      this.log.warn({ err, lock: this.lock.name }, 'leader lock not reachable');
      await this.lock.release();
      return false;
    }
    if (got && this.running) await this.stepUp();
    return true;
  }

  private async stepUp(): Promise<void> {
    if (this.leading) return;
    this.leading = true;
    this.log.info({ lock: this.lock.name, jobs: this.jobs.map((j) => j.name) }, 'this server now runs the once-only jobs');
    for (const job of this.jobs) {
      try {
        await job.start();
      } catch (err) {
        this.log.error({ err, job: job.name }, 'once-only job did not start');
      }
    }
    for (const l of this.changeListeners) l(true);
  }

  private async stepDown(why: string): Promise<void> {
    if (this.leading) {
      this.leading = false;
      for (const job of [...this.jobs].reverse()) {
        try {
          await job.stop();
        } catch (err) {
          this.log.error({ err, job: job.name }, 'once-only job did not stop');
        }
      }
      this.log.info({ lock: this.lock.name, why }, 'this server no longer runs the once-only jobs');
      for (const l of this.changeListeners) l(false);
    }
    await this.lock.release();
  }

  private pause(ms: number, onlyIfRunning: boolean): Promise<void> {
    if (onlyIfRunning && !this.running) return Promise.resolve();
    return new Promise((res) => {
      const t = setTimeout(done, ms);
      function done() {
        clearTimeout(t);
        res();
      }
      this.wake = done;
    });
  }
}
