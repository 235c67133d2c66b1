import type { AlarmView } from '../../shared/contracts/alarms';
import type { Alarm } from './alarm-types';

const iso = (ms: number) => new Date(ms).toISOString();

/** An engine alarm as the API shows it, under the given id (the stored id, or a negative one for an unstored run). */
export function alarmView(id: number, a: Alarm): AlarmView {
  return {
    id,
    kind: a.kind,
    severity: a.severity,
    state: a.state,
    unitId: a.unitId,
    serial: a.serial,
    siteId: a.siteId,
    message: a.message,
    advice: a.advice,
    evidence: a.evidence,
    firstSeenAt: iso(a.firstSeenMs),
    raisedAt: iso(a.raisedMs),
    lastSeenAt: iso(a.lastSeenMs),
    clearedAt: a.clearedMs === null ? null : iso(a.clearedMs),
    clearReason: a.clearReason,
    acknowledgedAt: null,
    acknowledgedBy: null,
  };
}
