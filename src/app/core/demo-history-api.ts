import { HttpClient } from '@angular/common/http';
import { inject, Injectable } from '@angular/core';
import { Observable } from 'rxjs';
import type { DemoHistoryView } from '../../../shared/contracts/demo-history';

/** `GET /api/demo-history` (admins only): progress of the demo's generated past. */
@Injectable({ providedIn: 'root' })
export class DemoHistoryApi {
  private readonly http = inject(HttpClient);

  current(): Observable<DemoHistoryView> {
    return this.http.get<DemoHistoryView>('/api/demo-history');
  }
}
