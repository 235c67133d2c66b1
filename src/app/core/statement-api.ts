import { HttpClient } from '@angular/common/http';
import { inject, Injectable } from '@angular/core';
import { Observable } from 'rxjs';
import type { MonthlyStatement, RestateRequest, StatementMonthList, StatementTrend } from '../../../shared/contracts/statements';

/** Owners' monthly statements of a site (owners: their own sites only, enforced by the server). */
@Injectable({ providedIn: 'root' })
export class StatementApi {
  private readonly http = inject(HttpClient);

  months(siteId: number): Observable<StatementMonthList> {
    return this.http.get<StatementMonthList>(`/api/sites/${siteId}/statements`);
  }

  /** The statement of a month: the version in force, or an earlier `version` of a locked month. */
  statement(siteId: number, month: string, version: number | null = null): Observable<MonthlyStatement> {
    return this.http.get<MonthlyStatement>(`/api/sites/${siteId}/statements/${month}${version === null ? '' : `?version=${version}`}`);
  }

  /** Restates a locked month with a reason (engineers and admins): answers the new version. */
  restate(siteId: number, month: string, reason: string): Observable<MonthlyStatement> {
    return this.http.post<MonthlyStatement>(`/api/sites/${siteId}/statements/${month}/restate`, { reason } satisfies RestateRequest);
  }

  trend(siteId: number): Observable<StatementTrend> {
    return this.http.get<StatementTrend>(`/api/sites/${siteId}/statement-trend`);
  }

  /** Where the browser downloads a statement's CSV (a plain link: the session cookie goes with it). */
  csvUrl(siteId: number, month: string, version: number | null = null): string {
    return `/api/sites/${siteId}/statements/${month}.csv${version === null ? '' : `?version=${version}`}`;
  }

  /** Where the browser downloads a statement's PDF (made on the server). */
  pdfUrl(siteId: number, month: string, version: number | null = null): string {
    return `/api/sites/${siteId}/statements/${month}.pdf${version === null ? '' : `?version=${version}`}`;
  }
}
