import { createConnection, type Connection } from 'mysql2/promise';
import type { Config } from '../config';

/**
 * A MariaDB named lock (`GET_LOCK`) held on a connection of its own: the lock lives as long as that session, so a
 * server that dies (its socket closes) frees it at once, and one that hangs or is cut off frees it when the database
 * drops the silent session (`wait_timeout`, set per session to `lostAfterS`). Named per database, so several
 * databases on one MariaDB (tests) never share a lock.
 *
 * Galera: named locks are local to the node that granted them, so every server must reach the same node for this
 * lock (a single-writer proxy such as haproxy with one active backend). After a fail-over the sessions are broken,
 * the leader steps down on its failed heartbeat and whichever server reaches the new node first leads.
 */
export class LeaderLock {
  private conn: Connection | undefined;
  /** A wait for the lock is under way on the session (a release then cuts the session instead of queueing behind it). */
  private waiting = false;
  readonly name: string;
  private lostListener: (() => void) | undefined;

  constructor(
    private readonly cfg: Config['db'],
    job: string,
    /** How long the database keeps the lock of a session that has gone silent [s]. */
    private readonly lostAfterS: number,
  ) {
    this.name = `bw:${cfg.database}:${job}`.slice(0, 64);
  }

  /** Called when the session ends without a release (the database ended it, or the connection broke): the lock is gone. */
  onLost(listener: () => void): void {
    this.lostListener = listener;
  }

  /** Waits up to `waitS` seconds for the lock; true when this session now holds it (or already did). */
  async acquire(waitS: number): Promise<boolean> {
    const conn = await this.connection();
    this.waiting = true;
    try {
      const [rows] = await conn.query({ sql: 'SELECT GET_LOCK(?, ?) AS got', values: [this.name, waitS], timeout: (waitS + 5) * 1000 });
      return (rows as { got: number | null }[])[0]?.got === 1;
    } finally {
      this.waiting = false;
    }
  }

  /** Whether this session still holds the lock; rejects when the database cannot be asked within `timeoutMs`. */
  async held(timeoutMs: number): Promise<boolean> {
    if (!this.conn) return false;
    const [rows] = await this.conn.query({
      sql: 'SELECT IS_USED_LOCK(?) = CONNECTION_ID() AS mine',
      values: [this.name],
      timeout: timeoutMs,
    });
    return (rows as { mine: number | null }[])[0]?.mine === 1;
  }

  /** Gives the lock up by ending the session (also frees it if the session was half-broken). */
  async release(): Promise<void> {
    const conn = this.conn;
    this.conn = undefined;
    if (!conn) return;
    if (this.waiting) {
      conn.destroy();
      return;
    }
    try {
      await conn.query({ sql: 'DO RELEASE_LOCK(?)', values: [this.name], timeout: 2000 });
      await conn.end();
    } catch {
      conn.destroy();
    }
  }

  private async connection(): Promise<Connection> {
    if (this.conn) return this.conn;
    const conn = await createConnection({
      host: this.cfg.host,
      port: this.cfg.port,
      user: this.cfg.user,
      password: this.cfg.password,
      database: this.cfg.database,
      connectTimeout: 5000,
    });
    // A broken session is never reused: the next acquire opens a new one.
    const lost = () => {
      if (this.conn !== conn) return;
      this.conn = undefined;
      conn.destroy();
      this.lostListener?.();
    };
    conn.on('error', lost);
    conn.on('end', lost);
    await conn.query('SET SESSION wait_timeout = ?', [this.lostAfterS]);
    this.conn = conn;
    return conn;
  }
}
