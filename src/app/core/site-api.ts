import { HttpClient } from '@angular/common/http';
import { inject, Injectable } from '@angular/core';
import { Observable } from 'rxjs';
import type { Site, SiteInput } from '../../../shared/contracts/api';

/** Sites the signed-in user may see (owners: their own only, enforced by the server). */
@Injectable({ providedIn: 'root' })
export class SiteApi {
  private readonly http = inject(HttpClient);

  list(): Observable<Site[]> {
    return this.http.get<Site[]>('/api/sites');
  }

  get(id: number): Observable<Site> {
    return this.http.get<Site>(`/api/sites/${id}`);
  }

  create(input: SiteInput): Observable<Site> {
    return this.http.post<Site>('/api/sites', input);
  }

  update(id: number, changes: Partial<SiteInput>): Observable<Site> {
    return this.http.patch<Site>(`/api/sites/${id}`, changes);
  }
}
