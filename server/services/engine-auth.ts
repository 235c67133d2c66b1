import { readdirSync, readFileSync, renameSync, writeFileSync, mkdirSync } from 'node:fs';
import { join } from 'node:path';
import bcrypt from 'bcryptjs';
import type { Logger } from 'pino';
import { natsAuthorization, type EngineUnit } from '../../broker/nats-auth';

/** The file each engine node includes (server/scripts/engine.sh writes the nodes' own files beside it). */
export const ENGINE_AUTH_FILE = 'units.conf';

/** Whether the process is a NATS node (a stale pid file may name a process that has nothing to do with it). */
function isEngineNode(pid: number): boolean {
  try {
    return readFileSync(`/proc/${pid}/comm`, 'utf8').trim() === 'nats-server';
  } catch {
    return false;
  }
}

/**
 * Keeps the message engine's users in step with the unit table: writes the authorization block (one user per enabled
 * unit, confined to its own topics; broker/nats-auth.ts) into the engine's folder and asks every node whose pid file is
 * there to reload it (SIGHUP: NATS re-reads its configuration and closes connections of users no longer allowed).
 * Called at start and after every committed unit change, one write at a time.
 */
export class EngineAuth {
  private chain: Promise<unknown> = Promise.resolve();
  private queued: Promise<{ units: number; reloaded: number }> | undefined;
  private readonly servicePasswordHash: string;

  constructor(
    private readonly units: { engineCredentials(): Promise<EngineUnit[]> },
    private readonly dir: string,
    private readonly service: { user: string; password: string },
    private readonly log: Logger,
    /** Worker partitions the units' readings are re-published to, by site (0: none). */
    private readonly partitions = 0,
  ) {
    this.servicePasswordHash = bcrypt.hashSync(service.password, 10);
  }

  /** Rewrites the file and reloads the running nodes; resolves with how many units are let in and nodes reloaded. */
  write(): Promise<{ units: number; reloaded: number }> {
    // Changes that come while a write is under way share the next one (it reads the table when it starts): a reload of
    // 100,000 users takes seconds, so a burst of changes must not queue one reload each.
    if (this.queued) return this.queued;
    const run = this.chain
      .catch(() => undefined)
      .then(() => {
        this.queued = undefined;
        return this.writeNow();
      });
    this.queued = run;
    this.chain = run;
    return run;
  }

  private async writeNow(): Promise<{ units: number; reloaded: number }> {
    const units = await this.units.engineCredentials();
    const text = natsAuthorization(units, { user: this.service.user, passwordHash: this.servicePasswordHash }, this.partitions);
    mkdirSync(this.dir, { recursive: true });
    const file = join(this.dir, ENGINE_AUTH_FILE);
    // Whole or not at all: a node reloading mid-write must never read half a file.
    writeFileSync(`${file}.tmp`, text, { mode: 0o600 });
    renameSync(`${file}.tmp`, file);
    let reloaded = 0;
    for (const pidFile of readdirSync(this.dir).filter((f) => /^n\d+\.pid$/.test(f))) {
      const pid = Number(readFileSync(join(this.dir, pidFile), 'utf8').trim());
      if (!Number.isInteger(pid) || pid <= 1 || !isEngineNode(pid)) continue;
      // A node that is not running reads the file when it starts.
      process.kill(pid, 'SIGHUP');
      reloaded++;
    }
    this.log.debug({ units: units.length, reloaded }, 'engine users written');
    return { units: units.length, reloaded };
  }
}
