import { HttpClient, HttpParams } from '@angular/common/http';
import { inject, Injectable } from '@angular/core';
import { Observable } from 'rxjs';
import type { SiteSurvey } from '../../../shared/contracts/survey';
import type { LandscapeDay, SiteLandscape } from '../../../shared/contracts/landscape';
import type { CommandView, IssueCommandRequest, UnitLiveState } from '../../../shared/contracts/live';
import type { UnitHolds } from '../../../shared/contracts/holds';
import type { UnitTraces } from '../../../shared/contracts/traces';

/** One raw telemetry row as `/api/units/:id/telemetry` returns it (database column names). */
export interface TelemetryRowView {
  ts: string;
  poa_wm2: number;
  dc_power_w: number;
  tilt_deg: number;
  azimuth_deg: number;
  cmd_tilt_deg: number;
  cmd_azimuth_deg: number;
  tilt_plus_wm2: number;
  tilt_minus_wm2: number;
  azimuth_plus_wm2: number;
  azimuth_minus_wm2: number;
  mode: string;
}

/** HTTP calls of the live screens: unit state, telemetry, commands, traces, landscapes and surveys. */
@Injectable({ providedIn: 'root' })
export class FleetApi {
  private readonly http = inject(HttpClient);

  state(unitId: number): Observable<UnitLiveState | null> {
    return this.http.get<UnitLiveState | null>(`/api/units/${unitId}/state`);
  }

  telemetry(unitId: number, from: Date, to: Date): Observable<TelemetryRowView[]> {
    const params = new HttpParams().set('from', from.toISOString()).set('to', to.toISOString());
    return this.http.get<TelemetryRowView[]>(`/api/units/${unitId}/telemetry`, { params });
  }

  commands(unitId: number): Observable<CommandView[]> {
    return this.http.get<CommandView[]>(`/api/units/${unitId}/commands`);
  }

  /** The unit's holds in force and the latest released ones. */
  holds(unitId: number): Observable<UnitHolds> {
    return this.http.get<UnitHolds>(`/api/units/${unitId}/holds`);
  }

  issue(unitId: number, request: IssueCommandRequest): Observable<CommandView> {
    return this.http.post<CommandView>(`/api/units/${unitId}/commands`, request);
  }

  traces(unitId: number, from: Date, to: Date, points: number): Observable<UnitTraces> {
    const params = new HttpParams().set('from', from.toISOString()).set('to', to.toISOString()).set('points', Math.round(points));
    return this.http.get<UnitTraces>(`/api/units/${unitId}/traces`, { params });
  }

  /** Address of the raw CSV export of a range (a plain link: the browser downloads it with the session cookie). */
  tracesCsvUrl(unitId: number, from: Date, to: Date): string {
    return `/api/units/${unitId}/traces.csv?from=${encodeURIComponent(from.toISOString())}&to=${encodeURIComponent(to.toISOString())}`;
  }

  landscape(siteId: number, at: Date, detectorTiltDeg: number, grid = true, stepDeg = 2): Observable<SiteLandscape> {
    const params = new HttpParams().set('at', at.toISOString()).set('detectorTiltDeg', detectorTiltDeg).set('stepDeg', stepDeg).set('grid', grid);
    return this.http.get<SiteLandscape>(`/api/sites/${siteId}/landscape`, { params });
  }

  landscapeDay(siteId: number, date: string): Observable<LandscapeDay> {
    return this.http.get<LandscapeDay>(`/api/sites/${siteId}/landscape/day`, { params: new HttpParams().set('date', date) });
  }

  bestNow(siteId: number): Observable<{ siteId: number; at: string; wm2: number }> {
    return this.http.get<{ siteId: number; at: string; wm2: number }>(`/api/sites/${siteId}/landscape/best`);
  }

  survey(siteId: number): Observable<SiteSurvey> {
    return this.http.get<SiteSurvey>(`/api/sites/${siteId}/survey`);
  }

  saveSurvey(siteId: number, survey: SiteSurvey): Observable<SiteSurvey> {
    return this.http.put<SiteSurvey>(`/api/sites/${siteId}/survey`, survey);
  }
}
