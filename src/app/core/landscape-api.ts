import { HttpClient, HttpParams } from '@angular/common/http';
import { inject, Injectable } from '@angular/core';
import { Observable } from 'rxjs';
import type { SiteSurvey } from '../../../shared/contracts/survey';
import type { LandscapeDay, SiteLandscape } from '../../../shared/contracts/landscape';
import type { SurveyRevision } from '../../../shared/contracts/survey-revisions';

/** A site's modelled landscape (now, over a day, its best), the survey it is computed from, and proposed corrections to it. */
@Injectable({ providedIn: 'root' })
export class LandscapeApi {
  private readonly http = inject(HttpClient);

  landscape(siteId: number, at: Date, detectorTiltDeg: number, grid = true, stepDeg = 2): Observable<SiteLandscape> {
    const params = new HttpParams()
      .set('at', at.toISOString())
      .set('detectorTiltDeg', detectorTiltDeg)
      .set('stepDeg', stepDeg)
      .set('grid', grid);
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

  surveyRevisions(siteId: number): Observable<SurveyRevision[]> {
    return this.http.get<SurveyRevision[]>(`/api/sites/${siteId}/survey-revisions`);
  }

  /** Fits corrections to the site's recent scans (takes up to a minute on the server). */
  proposeSurveyRevision(siteId: number): Observable<SurveyRevision> {
    return this.http.post<SurveyRevision>(`/api/sites/${siteId}/survey-revisions/propose`, {});
  }

  decideSurveyRevision(siteId: number, revisionId: number, decision: 'accept' | 'reject', reason: string): Observable<SurveyRevision> {
    return this.http.post<SurveyRevision>(`/api/sites/${siteId}/survey-revisions/${revisionId}/${decision}`, { reason });
  }
}
