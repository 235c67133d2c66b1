import { HttpClient, HttpParams } from '@angular/common/http';
import { inject, Injectable } from '@angular/core';
import { catchError, map, Observable, of } from 'rxjs';
import type {
  AlarmLiveItem,
  AlarmView,
  DetectorRunRequest,
  DetectorRunResult,
  HealthSettingsHistory,
  ScanResult,
  SiteHealthSettings,
} from '../../../shared/contracts/alarms';
import { toApiProblem } from '../ui/api-error';

export type { AlarmView } from '../../../shared/contracts/alarms';

/** Alarms, or `unavailable` with the reason when they could not be read. */
export type AlarmList = { available: true; alarms: AlarmView[] } | { available: false; reason: string };

export interface AlarmFilter {
  siteId?: number;
  unitId?: number;
  state?: 'active' | 'cleared';
  limit?: number;
}

/** The alarm in a live `{ type: 'alarm' }` message, or null for a wind-stow event (not an alarm). */
export function toAlarmView(item: AlarmLiveItem | null | undefined): AlarmView | null {
  if (!item || typeof item !== 'object' || item.state === 'event' || typeof (item as AlarmView).id !== 'number') return null;
  return item as AlarmView;
}

/** Health alarms, scans and per-site health settings. */
@Injectable({ providedIn: 'root' })
export class AlarmApi {
  private readonly http = inject(HttpClient);

  /** Alarms, newest first; never errors: a failing alarm service gives `available: false` with the reason. */
  list(filter: AlarmFilter): Observable<AlarmList> {
    let params = new HttpParams();
    for (const [k, v] of Object.entries(filter)) if (v !== undefined && v !== null && v !== '') params = params.set(k, v);
    return this.http.get<AlarmView[]>('/api/alarms', { params }).pipe(
      map((alarms): AlarmList => ({ available: true, alarms })),
      catchError((error: unknown) =>
        of<AlarmList>({ available: false, reason: `Alarms could not be loaded. ${toApiProblem(error).message}` }),
      ),
    );
  }

  get(id: number): Observable<AlarmView> {
    return this.http.get<AlarmView>(`/api/alarms/${id}`);
  }

  acknowledge(id: number): Observable<AlarmView> {
    return this.http.post<AlarmView>(`/api/alarms/${id}/acknowledge`, {});
  }

  /** The unit's latest scan (or the scan of one command). 404 when there is none yet. */
  latestScan(unitId: number, commandId?: string): Observable<ScanResult> {
    const params = commandId ? new HttpParams().set('commandId', commandId) : undefined;
    return this.http.get<ScanResult>(`/api/units/${unitId}/scans/latest`, { params });
  }

  healthSettings(siteId: number): Observable<SiteHealthSettings> {
    return this.http.get<SiteHealthSettings>(`/api/sites/${siteId}/health-settings`);
  }

  /** Replaces the site's overrides (a setting left out takes its default); the reason goes to the audit log. */
  saveHealthSettings(siteId: number, overrides: Record<string, number>, reason: string): Observable<SiteHealthSettings> {
    return this.http.put<SiteHealthSettings>(`/api/sites/${siteId}/health-settings`, { ...overrides, reason });
  }

  /** The site's saved changes of its health settings, newest first. */
  healthSettingsHistory(siteId: number, limit = 50): Observable<HealthSettingsHistory> {
    return this.http.get<HealthSettingsHistory>(`/api/sites/${siteId}/health-settings/history`, {
      params: new HttpParams().set('limit', limit),
    });
  }

  /** The detectors run over stored telemetry of a range (nothing stored), beside the alarms stored for it. */
  runDetectors(request: DetectorRunRequest): Observable<DetectorRunResult> {
    return this.http.post<DetectorRunResult>('/api/detectors/run', request);
  }
}
