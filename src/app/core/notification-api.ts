import { HttpClient, HttpParams } from '@angular/common/http';
import { inject, Injectable } from '@angular/core';
import { Observable } from 'rxjs';
import type { MailStatus, OutboxMessage } from '../../../shared/contracts/mail';
import type {
  NotificationList,
  NotificationSettings,
  NotificationView,
  OnCallEntry,
  OnCallRota,
} from '../../../shared/contracts/notifications';

/** Notifications, one's own settings, the on-call rota and the mail outbox (admins). */
@Injectable({ providedIn: 'root' })
export class NotificationApi {
  private readonly http = inject(HttpClient);

  list(limit = 20): Observable<NotificationList> {
    return this.http.get<NotificationList>('/api/notifications', { params: new HttpParams().set('limit', limit) });
  }

  read(id: number): Observable<NotificationView> {
    return this.http.post<NotificationView>(`/api/notifications/${id}/read`, {});
  }

  settings(): Observable<NotificationSettings> {
    return this.http.get<NotificationSettings>('/api/me/notification-settings');
  }

  saveSettings(s: NotificationSettings): Observable<NotificationSettings> {
    return this.http.put<NotificationSettings>('/api/me/notification-settings', s);
  }

  rota(): Observable<OnCallRota> {
    return this.http.get<OnCallRota>('/api/on-call');
  }

  saveRota(entries: OnCallEntry[]): Observable<OnCallRota> {
    return this.http.put<OnCallRota>('/api/on-call', { entries });
  }

  outbox(status?: MailStatus): Observable<OutboxMessage[]> {
    let params = new HttpParams().set('limit', 500);
    if (status) params = params.set('status', status);
    return this.http.get<OutboxMessage[]>('/api/mail/outbox', { params });
  }
}
