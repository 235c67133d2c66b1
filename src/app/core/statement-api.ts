import { HttpClient } from '@angular/common/http';
import { inject, Injectable } from '@angular/core';
import { Observable } from 'rxjs';
import type { MonthlyStatement, StatementMonthList, StatementTrend } from '../../../shared/contracts/statements';

/** Owners' monthly statements of a site (owners: their own sites only, enforced by the server). */
@Injectable({ providedIn: 'root' })
export class StatementApi {
  private readonly http = inject(HttpClient);

  months(siteId: number): Observable<StatementMonthList> {
    return this.http.get<StatementMonthList>(`/api/sites/${siteId}/statements`);
  }

  statement(siteId: number, month: string): Observable<MonthlyStatement> {
    return this.http.get<MonthlyStatement>(`/api/sites/${siteId}/statements/${month}`);
  }

  trend(siteId: number): Observable<StatementTrend> {
    return this.http.get<StatementTrend>(`/api/sites/${siteId}/statement-trend`);
  }

  /** Where the browser downloads a statement's CSV (a plain link: the session cookie goes with it). */
  csvUrl(siteId: number, month: string): string {
    return `/api/sites/${siteId}/statements/${month}.csv`;
  }
}
