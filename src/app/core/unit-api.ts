import { HttpClient, HttpParams } from '@angular/common/http';
import { inject, Injectable } from '@angular/core';
import { Observable } from 'rxjs';
import type { Unit, UnitInput } from '../../../shared/contracts/api';
import type { UnitLiveState } from '../../../shared/contracts/live';

/** A new unit with its MQTT device secret, which the server shows only this once. */
export interface UnitWithSecret {
  unit: Unit;
  deviceSecret: string;
}

/** Units: the list, one unit, its latest live state, and the admin's changes. */
@Injectable({ providedIn: 'root' })
export class UnitApi {
  private readonly http = inject(HttpClient);

  /** Units the user may see, optionally only those of one site. */
  list(siteId?: number): Observable<Unit[]> {
    const params = siteId === undefined ? undefined : new HttpParams().set('siteId', siteId);
    return this.http.get<Unit[]>('/api/units', { params });
  }

  get(id: number): Observable<Unit> {
    return this.http.get<Unit>(`/api/units/${id}`);
  }

  /** The unit's latest live state; null before its first report. */
  state(id: number): Observable<UnitLiveState | null> {
    return this.http.get<UnitLiveState | null>(`/api/units/${id}/state`);
  }

  create(input: UnitInput): Observable<UnitWithSecret> {
    return this.http.post<UnitWithSecret>('/api/units', input);
  }

  update(id: number, changes: Partial<UnitInput>): Observable<Unit> {
    return this.http.patch<Unit>(`/api/units/${id}`, changes);
  }

  /** Issues a new device secret; the old one stops working. */
  rotateSecret(id: number): Observable<{ deviceSecret: string }> {
    return this.http.post<{ deviceSecret: string }>(`/api/units/${id}/secret`, null);
  }
}
