import { HttpClient, HttpParams } from '@angular/common/http';
import { inject, Injectable } from '@angular/core';
import { Observable } from 'rxjs';
import type { ApplyDetectorTiltResult, DetectorTiltRecommendation } from '../../../shared/contracts/detector-tilt';

/** The detector tilt a site needs, and sending it to all the site's units. */
@Injectable({ providedIn: 'root' })
export class DetectorTiltApi {
  private readonly http = inject(HttpClient);

  /** The year's worst day's single-peak detector tilt plus a margin (the server takes a few seconds the first time). */
  recommendation(siteId: number, year: number, marginDeg?: number): Observable<DetectorTiltRecommendation> {
    let params = new HttpParams().set('year', year);
    if (marginDeg !== undefined) params = params.set('marginDeg', marginDeg);
    return this.http.get<DetectorTiltRecommendation>(`/api/sites/${siteId}/detector-tilt`, { params });
  }

  /** One confirmed `configure` command per enabled unit of the site. */
  apply(siteId: number, detectorTiltDeg: number): Observable<ApplyDetectorTiltResult> {
    return this.http.post<ApplyDetectorTiltResult>(`/api/sites/${siteId}/detector-tilt`, { detectorTiltDeg, confirm: true });
  }
}
