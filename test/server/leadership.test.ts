import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { pino } from 'pino';
import request from 'supertest';
import { LeaderLock } from '../../server/data/leader-lock';
import { Leadership, lockLostAfterS, type LeadershipOptions } from '../../server/services/leadership';
import { startStack, type Stack } from '../../server/stack';
import { createTestDatabase, type TestDatabase } from '../helpers/test-db';
import { waitFor } from '../helpers/fake-unit';
import { WIRE_VERSION } from '../../shared/contracts/wire-format';

const silent = pino({ level: 'silent' });
const FAST: LeadershipOptions = { heartbeatMs: 150, heartbeatTimeoutMs: 500, waitS: 1, retryMs: 100 };

let testDb: TestDatabase;
beforeAll(async () => {
  testDb = await createTestDatabase({ seed: true });
});
afterAll(async () => {
  await testDb?.drop();
});

/** The connection id holding the named lock, as the database sees it (null when free). */
const holderOf = async (name: string): Promise<number | null> => {
  const [rows] = (await testDb.db.raw('SELECT IS_USED_LOCK(?) AS id', [name])) as unknown as [{ id: number | null }[]];
  return rows[0]!.id;
};

describe('leader lock (MariaDB GET_LOCK on a session of its own)', () => {
  it('is held by one session at a time and passes to a waiting one when released', async () => {
    const a = new LeaderLock(testDb.config.db, 'lock-test', 30);
    const b = new LeaderLock(testDb.config.db, 'lock-test', 30);
    try {
      expect(await a.acquire(0)).toBe(true);
      expect(await b.acquire(0)).toBe(false);
      expect(await a.held(1000)).toBe(true);
      expect(await b.held(1000)).toBe(false);
      const waiting = b.acquire(5);
      await a.release();
      expect(await waiting).toBe(true);
      expect(await b.held(1000)).toBe(true);
    } finally {
      await a.release();
      await b.release();
    }
  });

  it('is named per database, so two databases on one MariaDB never share it', () => {
    expect(new LeaderLock(testDb.config.db, 'once-jobs', 30).name).toBe(`bw:${testDb.config.db.database}:once-jobs`);
  });

  it('keeps the database from dropping a leader session before the leader has noticed it cannot reach the database', () => {
    // A heartbeat every 5 s that may take 3 s: the leader stops within 8 s of its last good heartbeat; the database
    // frees the lock only after 13 s of silence.
    expect(lockLostAfterS({ heartbeatMs: 5000, heartbeatTimeoutMs: 3000, waitS: 5, retryMs: 2000 })).toBe(13);
  });
});

describe('leadership of the once-only jobs', () => {
  const jobLog: string[] = [];
  const leadershipOf = (who: string, lock: LeaderLock) => {
    const l = new Leadership(lock, silent, FAST);
    l.add({ name: 'job', start: () => void jobLog.push(`${who} start`), stop: () => void jobLog.push(`${who} stop`) });
    return l;
  };

  it('runs the jobs on exactly one of two servers, and moves them when the leader session is cut', async () => {
    jobLog.length = 0;
    const lockA = new LeaderLock(testDb.config.db, 'jobs-test', lockLostAfterS(FAST));
    const lockB = new LeaderLock(testDb.config.db, 'jobs-test', lockLostAfterS(FAST));
    const a = leadershipOf('a', lockA);
    const b = leadershipOf('b', lockB);
    await a.start();
    await b.start();
    try {
      expect([a.isLeader, b.isLeader]).toEqual([true, false]);
      expect(jobLog).toEqual(['a start']);
      // The database ends the leader's session (as when it drops a silent one): a stops on its next heartbeat, b takes over.
      const holder = await holderOf(lockA.name);
      expect(holder).not.toBeNull();
      await testDb.db.raw(`KILL CONNECTION ${Number(holder)}`);
      await waitFor(() => b.isLeader && !a.isLeader, 5000);
      expect(jobLog.slice(0, 3).sort()).toEqual(['a start', 'a stop', 'b start']);
      // a waits now; b leaving hands the jobs back at once.
      await b.stop();
      await waitFor(() => a.isLeader, 3000);
      expect(jobLog.slice(3)).toEqual(['b stop', 'a start']);
    } finally {
      await a.stop();
      await b.stop();
    }
  });

  it('a follower that stops does not wait out its lock wait', async () => {
    const a = leadershipOf('a', new LeaderLock(testDb.config.db, 'stop-test', 30));
    const b = new Leadership(new LeaderLock(testDb.config.db, 'stop-test', 30), silent, { ...FAST, waitS: 20 });
    await a.start();
    await b.start();
    const t0 = Date.now();
    await b.stop();
    expect(Date.now() - t0).toBeLessThan(3000);
    expect(b.isLeader).toBe(false);
    await a.stop();
  });
});

describe('two servers on one database', () => {
  let first: Stack;
  let second: Stack;
  let clockMs = Date.parse('2026-06-15T10:00:00Z');
  const now = () => clockMs;
  const start = () =>
    startStack(
      {
        ...testDb.config,
        port: 0,
        broker: { host: '127.0.0.1', port: 0 },
        sessionSecret: 'test-secret-test-secret-test-secret-0',
        cluster: true,
      },
      silent,
      { warmLandscapes: false, leadership: FAST, health: { now, tickMs: 3_600_000 }, statements: { autoLock: false } },
    );
  beforeAll(async () => {
    first = await start();
    second = await start();
  });
  afterAll(async () => {
    await first?.stop();
    await second?.stop();
  });

  it('share one sign-in limit: failures on either server count against the same account', async () => {
    const email = 'crew1@saltmarsh.example';
    const statuses: number[] = [];
    for (let i = 0; i < 11; i++)
      statuses.push(
        (
          await request(i % 2 ? second.http : first.http)
            .post('/api/auth/sign-in')
            .send({ email, password: 'no' })
        ).status,
      );
    expect(statuses).toEqual([...Array(10).fill(401), 429]);
  });

  it('judge comms on the leader only, from what every server heard: a unit heard by the follower is not silent to the leader', async () => {
    expect([first.leadership.isLeader, second.leadership.isLeader]).toEqual([true, false]);
    expect([first.health.isWatching, second.health.isWatching]).toEqual([true, false]);
    const unit = second.units.get('QED-2405')!;
    // The unit reports to the follower only.
    second.health.status(unit, { v: WIRE_VERSION, online: true, ts: new Date(clockMs).toISOString() });
    await second.health.cycle();
    await first.health.cycle();
    const commsOf = (s: Stack) => s.health.engine.openAlarms().filter((a) => a.kind === 'comms' && a.unitId === unit.id);
    // An hour later without a word: the leader (which never heard the unit itself) raises comms loss; the follower does not judge.
    clockMs += 3_600_000;
    await second.health.cycle();
    await first.health.cycle();
    expect(commsOf(first).length).toBe(1);
    expect(commsOf(second)).toEqual([]);
    // The unit speaks to the follower again: the leader hears of it through the database and clears its alarm.
    second.health.status(unit, { v: WIRE_VERSION, online: true, ts: new Date(clockMs).toISOString() });
    await second.health.cycle();
    await first.health.cycle();
    expect(commsOf(first).filter((a) => a.clearedMs === null)).toEqual([]);
  });

  it('run each once-only job on one server; when the leader stops, the other starts every job within moments', async () => {
    const spies = [
      vi.spyOn(second.retention, 'start'),
      vi.spyOn(second.tickets, 'start'),
      vi.spyOn(second.notifications, 'start'),
      vi.spyOn(second.mail, 'resume'),
    ];
    await new Promise((r) => setTimeout(r, 400));
    for (const s of spies) expect(s).not.toHaveBeenCalled();
    const t0 = Date.now();
    await first.stop();
    await waitFor(() => second.leadership.isLeader, 3000);
    expect(Date.now() - t0).toBeLessThan(3000);
    for (const s of spies) expect(s).toHaveBeenCalledTimes(1);
    expect(second.health.isWatching).toBe(true);
  });
});
