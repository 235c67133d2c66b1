import { HttpClient, HttpParams } from '@angular/common/http';
import { inject, Injectable } from '@angular/core';
import type { Observable } from 'rxjs';
import type { AlarmSeverity } from '../../../shared/contracts/alarms';
import type { AvailabilityCategory, TicketClosure, TicketPart, TicketState, TicketView } from '../../../shared/contracts/tickets';

export type { TicketView } from '../../../shared/contracts/tickets';

export interface TicketListFilter {
  state?: TicketState;
  siteId?: number;
  unitId?: number;
  assignee?: 'me';
}

export interface NewTicket {
  unitId?: number;
  siteId?: number;
  title: string;
  severity: AlarmSeverity;
  description?: string;
}

export interface TicketMove {
  to: TicketState;
  version: number;
  note?: string;
  reason?: string;
  assigneeId?: number;
  confirm?: boolean;
  closure?: TicketClosure;
  availabilityCategory?: AvailabilityCategory;
  parts?: TicketPart[];
}

/** Work orders: list, read, open and move through their lifecycle. */
@Injectable({ providedIn: 'root' })
export class TicketApi {
  private readonly http = inject(HttpClient);

  list(filter: TicketListFilter = {}): Observable<TicketView[]> {
    let params = new HttpParams();
    for (const [k, v] of Object.entries(filter)) if (v !== undefined && v !== null) params = params.set(k, String(v));
    return this.http.get<TicketView[]>('/api/tickets', { params });
  }

  get(id: number): Observable<TicketView> {
    return this.http.get<TicketView>(`/api/tickets/${id}`);
  }

  create(t: NewTicket): Observable<TicketView> {
    return this.http.post<TicketView>('/api/tickets', t);
  }

  /** The ticket of an alarm's fault: the open one, the recently resolved one reopened, or a new one. */
  forAlarm(alarmId: number): Observable<TicketView> {
    return this.http.post<TicketView>('/api/tickets', { alarmId });
  }

  move(id: number, m: TicketMove): Observable<TicketView> {
    return this.http.post<TicketView>(`/api/tickets/${id}/transition`, m);
  }

  assignees(): Observable<{ id: number; name: string }[]> {
    return this.http.get<{ id: number; name: string }[]>('/api/tickets/assignees');
  }
}
