/**
 * The alarm lifecycle, kept apart from the detectors: a detector says, at an instant, whether its condition holds (true),
 * does not hold (false) or cannot be judged now (null: no data, or a short gap such as a brief re-seek). The book turns
 * that into alarms:
 *  - delay-on: the condition must hold continuously for the kind's delay before an alarm is raised; its first-seen time
 *    is when the condition started;
 *  - hysteresis in time: an open alarm clears only after the condition has been absent for the kind's clear delay (value
 *    hysteresis — a clear threshold different from the raise threshold — lives in the detectors);
 *  - auto-clear: no one has to clear an alarm whose condition ended;
 *  - dedupe: at most one open alarm per subject and kind; while open, further sightings only move last-seen;
 *  - suppression: a suppressed subject (its site is dark) raises nothing; its pending delays are kept.
 * Times come from the caller (telemetry timestamps or the engine clock), never from the wall clock.
 */
import type { AlarmKind } from '../../shared/contracts/alarms';
import type { Alarm, AlarmDetail, AlarmSubject } from './alarm-types';

export interface AlarmTiming {
  delayOnMs: number;
  clearDelayMs: number;
}

export interface AlarmBookListeners {
  raised?: (a: Alarm) => void;
  /** An open alarm seen again (last-seen moved, detail refreshed). Called at most once a minute per alarm. */
  updated?: (a: Alarm) => void;
  cleared?: (a: Alarm) => void;
}

interface Track {
  pendingSinceMs: number | null;
  absentSinceMs: number | null;
  open: Alarm | null;
  lastUpdateMs: number;
}

export const subjectKey = (s: AlarmSubject) => (s.unitId === null ? `site:${s.siteId}` : `unit:${s.unitId}`);

/** A subject as a number (units by id, sites below zero): the book is asked several times per report, so no strings. */
const subjectId = (s: AlarmSubject): number => (s.unitId === null ? -1 - s.siteId : s.unitId);

export class AlarmBook {
  /** Tracks by subject, then kind. */
  private readonly tracks = new Map<number, Map<AlarmKind, Track>>();
  private readonly history: Alarm[] = [];
  private readonly listeners: AlarmBookListeners[] = [];

  constructor(listeners?: AlarmBookListeners) {
    if (listeners) this.listeners.push(listeners);
  }

  listen(l: AlarmBookListeners): void {
    this.listeners.push(l);
  }

  /**
   * Reports the condition of `kind` on `subject` at `atMs`. `detail` is called only when an alarm is raised or refreshed.
   * `suppressed` blocks raising (an alarm already open stays open).
   */
  assess(
    subject: AlarmSubject,
    kind: AlarmKind,
    condition: boolean | null,
    atMs: number,
    timing: AlarmTiming,
    detail: () => AlarmDetail,
    suppressed = false,
  ): Alarm | null {
    const id = subjectId(subject);
    let kinds = this.tracks.get(id);
    let t = kinds?.get(kind);
    if (!t) {
      if (condition !== true) return null;
      t = { pendingSinceMs: null, absentSinceMs: null, open: null, lastUpdateMs: -Infinity };
      if (!kinds) this.tracks.set(id, (kinds = new Map()));
      kinds.set(kind, t);
    }
    if (condition === null) return t.open;
    if (condition) {
      t.absentSinceMs = null;
      if (t.open) {
        t.open.lastSeenMs = Math.max(t.open.lastSeenMs, atMs);
        if (atMs - t.lastUpdateMs >= 60_000) {
          t.lastUpdateMs = atMs;
          const d = detail();
          // Severity may rise (e.g. many units trapped); the evidence snapshot of the raise is kept, the latest added.
          Object.assign(t.open, {
            severity: d.severity < t.open.severity ? d.severity : t.open.severity,
            message: d.message,
            advice: d.advice,
            evidence: { ...t.open.evidence, latest: d.evidence },
          });
          for (const l of this.listeners) l.updated?.(t.open);
        }
        return t.open;
      }
      t.pendingSinceMs ??= atMs;
      if (atMs - t.pendingSinceMs >= timing.delayOnMs && !suppressed) {
        const d = detail();
        const a: Alarm = {
          ...subject,
          ...d,
          key: `${subjectKey(subject)}/${kind}@${atMs}`,
          kind,
          state: 'active',
          firstSeenMs: t.pendingSinceMs,
          raisedMs: atMs,
          lastSeenMs: atMs,
          clearedMs: null,
          clearReason: null,
        };
        t.open = a;
        t.lastUpdateMs = atMs;
        this.history.push(a);
        for (const l of this.listeners) l.raised?.(a);
      }
      return t.open;
    }
    // condition false
    t.pendingSinceMs = null;
    if (t.open) {
      t.absentSinceMs ??= atMs;
      if (atMs - t.absentSinceMs >= timing.clearDelayMs) this.close(id, kind, t, atMs, 'condition ended');
    } else {
      this.forget(id, kind);
    }
    return null;
  }

  /** Clears an open alarm now (e.g. superseded by a site alarm). */
  clear(subject: AlarmSubject, kind: AlarmKind, atMs: number, reason: string): void {
    const id = subjectId(subject);
    const t = this.tracks.get(id)?.get(kind);
    if (t?.open) this.close(id, kind, t, atMs, reason);
  }

  private close(id: number, kind: AlarmKind, t: Track, atMs: number, reason: string): void {
    const a = t.open!;
    a.state = 'cleared';
    a.clearedMs = atMs;
    a.clearReason = reason;
    this.forget(id, kind);
    for (const l of this.listeners) l.cleared?.(a);
  }

  private forget(id: number, kind: AlarmKind): void {
    const kinds = this.tracks.get(id);
    if (!kinds) return;
    kinds.delete(kind);
    if (!kinds.size) this.tracks.delete(id);
  }

  /** The open alarm of a subject and kind, if any. */
  openAlarm(subject: AlarmSubject, kind: AlarmKind): Alarm | null {
    return this.tracks.get(subjectId(subject))?.get(kind)?.open ?? null;
  }

  /** Whether the condition of a subject and kind is holding now (pending or open). */
  holding(subject: AlarmSubject, kind: AlarmKind): boolean {
    const t = this.tracks.get(subjectId(subject))?.get(kind);
    return !!t && (t.open !== null || t.pendingSinceMs !== null) && t.absentSinceMs === null;
  }

  open(): Alarm[] {
    return this.history.filter((a) => a.state === 'active');
  }

  /** Drops cleared alarms from memory (the server keeps them in the database). */
  pruneCleared(): void {
    for (let i = this.history.length - 1; i >= 0; i--) if (this.history[i]!.state === 'cleared') this.history.splice(i, 1);
  }

  /** Every alarm raised so far (since the last prune), open and cleared, oldest first. */
  all(): Alarm[] {
    return [...this.history];
  }
}
