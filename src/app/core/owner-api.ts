import { HttpClient } from '@angular/common/http';
import { inject, Injectable } from '@angular/core';
import { Observable } from 'rxjs';
import type { Owner, OwnerInput } from '../../../shared/contracts/api';

@Injectable({ providedIn: 'root' })
export class OwnerApi {
  private readonly http = inject(HttpClient);

  list(): Observable<Owner[]> {
    return this.http.get<Owner[]>('/api/owners');
  }

  create(input: OwnerInput): Observable<Owner> {
    return this.http.post<Owner>('/api/owners', input);
  }

  update(id: number, changes: Partial<OwnerInput>): Observable<Owner> {
    return this.http.patch<Owner>(`/api/owners/${id}`, changes);
  }
}
