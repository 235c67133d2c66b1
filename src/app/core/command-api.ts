import { HttpClient } from '@angular/common/http';
import { inject, Injectable } from '@angular/core';
import { Observable } from 'rxjs';
import type { CommandView, IssueCommandRequest } from '../../../shared/contracts/live';
import type { UnitHolds } from '../../../shared/contracts/holds';

/** A unit's commands and maintenance holds. */
@Injectable({ providedIn: 'root' })
export class CommandApi {
  private readonly http = inject(HttpClient);

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
}
