import { HttpClient, HttpParams } from '@angular/common/http';
import { inject, Injectable } from '@angular/core';
import { Observable } from 'rxjs';
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

/** A unit's reports: raw telemetry of a range, traces at a resolution and their CSV export. */
@Injectable({ providedIn: 'root' })
export class TelemetryApi {
  private readonly http = inject(HttpClient);

  telemetry(unitId: number, from: Date, to: Date): Observable<TelemetryRowView[]> {
    const params = new HttpParams().set('from', from.toISOString()).set('to', to.toISOString());
    return this.http.get<TelemetryRowView[]>(`/api/units/${unitId}/telemetry`, { params });
  }

  traces(unitId: number, from: Date, to: Date, points: number): Observable<UnitTraces> {
    const params = new HttpParams().set('from', from.toISOString()).set('to', to.toISOString()).set('points', Math.round(points));
    return this.http.get<UnitTraces>(`/api/units/${unitId}/traces`, { params });
  }

  /** Address of the raw CSV export of a range (a plain link: the browser downloads it with the session cookie). */
  tracesCsvUrl(unitId: number, from: Date, to: Date): string {
    return `/api/units/${unitId}/traces.csv?from=${encodeURIComponent(from.toISOString())}&to=${encodeURIComponent(to.toISOString())}`;
  }
}
