import type { Logger } from 'pino';
import type { AlarmView } from '../../shared/contracts/alarms';
import type { AlarmRepository } from '../data/alarm-repository';
import type { Alarm } from '../health/alarm-types';
import { alarmView } from '../health/alarm-view';
import type { LiveHub } from './live-hub';
import type { UnitDirectory } from './unit-directory';

/**
 * Keeps the health engine's alarms in the database and pushes each change to dashboards. The writes of one alarm are
 * chained, so an update never overtakes its insert; an alarm still active from before a restart is taken over, not
 * stored twice.
 */
export class AlarmStore {
  private readonly dbIds = new Map<string, Promise<number | null>>();
  private readonly raisedListeners = new Set<(a: AlarmView) => void>();
  private readonly writes = new Set<Promise<unknown>>();

  constructor(
    private readonly repo: AlarmRepository,
    private readonly units: UnitDirectory,
    private readonly live: LiveHub,
    private readonly log: Logger,
  ) {}

  /** Called once per raised alarm (after it is stored). Returns an unsubscribe function. */
  onRaised(listener: (a: AlarmView) => void): () => void {
    this.raisedListeners.add(listener);
    return () => this.raisedListeners.delete(listener);
  }

  raised(a: Alarm): void {
    const p = (async () => {
      const existing = await this.repo.findActive(a.siteId, a.unitId, a.kind);
      if (existing !== undefined) {
        await this.repo.restate(existing, a);
        return existing;
      }
      return this.repo.insert(a);
    })().catch((err) => {
      this.log.error({ err, kind: a.kind }, 'storing an alarm failed');
      return null;
    });
    this.dbIds.set(a.key, p);
    this.track(
      p.then((id) => {
        if (id === null) return;
        const v = alarmView(id, a);
        this.publish(a, v);
        for (const l of this.raisedListeners) {
          try {
            l(v);
          } catch (err) {
            this.log.error({ err }, 'alarm-raised listener failed');
          }
        }
      }),
    );
  }

  updated(a: Alarm): void {
    // What the alarm says now: the engine keeps changing its record while the write waits its turn.
    const seen = {
      severity: a.severity,
      message: a.message,
      advice: a.advice,
      evidence: structuredClone(a.evidence),
      lastSeenMs: a.lastSeenMs,
    };
    this.chain(a, (id) => this.repo.markSeen(id, seen));
  }

  cleared(a: Alarm): void {
    const clear = { clearedMs: a.clearedMs, clearReason: a.clearReason, lastSeenMs: a.lastSeenMs };
    this.chain(a, async (id) => {
      await this.repo.markCleared(id, clear);
      this.publish(a, alarmView(id, a));
    });
    this.dbIds.delete(a.key);
  }

  /** Settled writes (tests and shutdown wait for them). */
  async flush(): Promise<void> {
    while (this.writes.size) await Promise.allSettled([...this.writes]);
  }

  /** The writes under way now, settled. */
  async settle(): Promise<void> {
    await Promise.allSettled([...this.writes]);
  }

  private chain(a: Alarm, write: (id: number) => Promise<void>): void {
    const prev = this.dbIds.get(a.key);
    if (!prev) return;
    const next = prev.then(async (id) => {
      if (id === null) return null;
      await write(id).catch((err) => this.log.error({ err, kind: a.kind }, 'updating an alarm failed'));
      return id;
    });
    if (a.state === 'active') this.dbIds.set(a.key, next);
    this.track(next);
  }

  private publish(a: Alarm, v: AlarmView): void {
    const unitId = a.unitId ?? this.units.all().find((u) => u.siteId === a.siteId)?.id;
    if (unitId !== undefined) this.live.publishAlarm(unitId, v);
  }

  private track(p: Promise<unknown>): void {
    this.writes.add(p);
    void p.finally(() => this.writes.delete(p));
  }
}
