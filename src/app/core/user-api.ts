import { HttpClient } from '@angular/common/http';
import { inject, Injectable } from '@angular/core';
import { Observable } from 'rxjs';
import type { CreateUserRequest, UpdateUserRequest, User } from '../../../shared/contracts/api';

@Injectable({ providedIn: 'root' })
export class UserApi {
  private readonly http = inject(HttpClient);

  list(): Observable<User[]> {
    return this.http.get<User[]>('/api/users');
  }

  create(request: CreateUserRequest): Observable<User> {
    return this.http.post<User>('/api/users', request);
  }

  update(id: number, changes: UpdateUserRequest): Observable<User> {
    return this.http.patch<User>(`/api/users/${id}`, changes);
  }

  setPassword(id: number, password: string): Observable<void> {
    return this.http.post<void>(`/api/users/${id}/password`, { password });
  }
}
