import { HttpClient, HttpParams } from '@angular/common/http';
import { inject, Injectable } from '@angular/core';
import { catchError, map, Observable, of } from 'rxjs';
import { toApiProblem } from '../ui/api-error';

/** An alarm as the dashboard shows it, read tolerantly from the alarm service's records. */
export interface AlarmView {
  id: string;
  unitId: number | null;
  siteId: number | null;
  serial: string | null;
  kind: string;
  /** P1 (most urgent) … P4. */
  severity: string;
  /** 'active', 'cleared', … as the server says. */
  state: string;
  acknowledged: boolean;
  message: string;
  raisedAt: string | null;
}

/** Alarms, or `unavailable` when the alarm service does not answer (not installed, or failing). */
export type AlarmList = { available: true; alarms: AlarmView[] } | { available: false; reason: string };

const str = (v: unknown): string | null => (typeof v === 'string' && v ? v : null);
const num = (v: unknown): number | null => (typeof v === 'number' && Number.isFinite(v) ? v : null);
const time = (v: unknown): string | null => {
  if (typeof v === 'number' && Number.isFinite(v)) return new Date(v).toISOString();
  if (typeof v === 'string' && !Number.isNaN(Date.parse(v))) return new Date(v).toISOString();
  return null;
};

/** Reads one alarm record (from REST or the live socket) into an {@link AlarmView}; null when it is not one. */
export function toAlarmView(raw: unknown): AlarmView | null {
  if (!raw || typeof raw !== 'object') return null;
  const a = raw as Record<string, unknown>;
  const kind = str(a['kind']) ?? str(a['type']);
  if (!kind) return null;
  const id = a['id'] ?? a['key'] ?? `${kind}:${String(a['unitId'] ?? a['siteId'] ?? '')}:${String(a['raisedAt'] ?? a['raisedMs'] ?? '')}`;
  return {
    id: String(id),
    unitId: num(a['unitId']),
    siteId: num(a['siteId']),
    serial: str(a['serial']),
    kind,
    severity: str(a['severity']) ?? 'P4',
    state: str(a['state']) ?? 'active',
    acknowledged: Boolean(a['acknowledged'] ?? a['acknowledgedAt'] ?? a['ackedAt']),
    message: str(a['message']) ?? kind,
    raisedAt: time(a['raisedAt'] ?? a['raisedMs'] ?? a['openedAt'] ?? a['firstSeenMs']),
  };
}

/** Plain names of alarm kinds; unknown kinds are shown as sent, with dashes as spaces. */
export function alarmKindLabel(kind: string): string {
  const names: Record<string, string> = {
    trap: 'Stuck on a lesser peak',
    stall: 'Actuator stall',
    drift: 'Detector drift',
    hunting: 'Hunting',
    comms: 'No reports',
    'site-comms': 'Site silent',
    soiling: 'Soiling',
    'not-stowed': 'Did not stow',
  };
  return names[kind] ?? kind.replace(/-/g, ' ');
}

@Injectable({ providedIn: 'root' })
export class AlarmApi {
  private readonly http = inject(HttpClient);

  /** Active alarms of a site or unit; never errors: a missing or failing alarm service gives `available: false`. */
  list(filter: { siteId?: number; unitId?: number; state?: string }): Observable<AlarmList> {
    let params = new HttpParams();
    if (filter.siteId !== undefined) params = params.set('siteId', filter.siteId);
    if (filter.unitId !== undefined) params = params.set('unitId', filter.unitId);
    if (filter.state) params = params.set('state', filter.state);
    return this.http.get<unknown>('/api/alarms', { params }).pipe(
      map((body): AlarmList => {
        const items = Array.isArray(body) ? body : Array.isArray((body as { alarms?: unknown })?.alarms) ? (body as { alarms: unknown[] }).alarms : null;
        if (!items) return { available: false, reason: 'The alarm service gave an answer the dashboard cannot read.' };
        return { available: true, alarms: items.map(toAlarmView).filter((a): a is AlarmView => a !== null) };
      }),
      catchError((error: unknown) => {
        const p = toApiProblem(error);
        return of<AlarmList>({
          available: false,
          reason: p.status === 404 ? 'Alarms are not available on this server yet.' : `Alarms could not be loaded. ${p.message}`,
        });
      }),
    );
  }
}
