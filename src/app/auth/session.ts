import { HttpClient } from '@angular/common/http';
import { computed, inject, Injectable, signal } from '@angular/core';
import { firstValueFrom, Observable, tap } from 'rxjs';
import type { ChangePasswordRequest, Me, Role, SignInRequest } from '../../../shared/contracts/api';

/**
 * Who is signed in. The session itself lives in an httpOnly cookie the dashboard cannot read,
 * so the server is asked once (`GET /api/me`) and the answer is kept in signals.
 */
@Injectable({ providedIn: 'root' })
export class Session {
  private readonly http = inject(HttpClient);
  private readonly current = signal<Me | null>(null);
  private restoring: Promise<Me | null> | null = null;
  private leaving = false;

  /** The signed-in user, or null. */
  readonly me = this.current.asReadonly();
  /** The signed-in user's role, or null. */
  readonly role = computed<Role | null>(() => this.current()?.role ?? null);

  /** Resolves with the signed-in user (asking the server the first time), or null when signed out. */
  restore(): Promise<Me | null> {
    this.restoring ??= firstValueFrom(this.http.get<Me>('/api/me')).then(
      (me) => {
        this.current.set(me);
        return me;
      },
      () => {
        this.current.set(null);
        return null;
      },
    );
    return this.restoring;
  }

  signIn(request: SignInRequest): Observable<Me> {
    return this.http.post<Me>('/api/auth/sign-in', request).pipe(
      tap((me) => {
        this.current.set(me);
        this.restoring = Promise.resolve(me);
      }),
    );
  }

  /** True from the moment the user asks to sign out until the server has answered. */
  get signingOut(): boolean {
    return this.leaving;
  }

  signOut(): Observable<void> {
    this.leaving = true;
    return this.http.post<void>('/api/auth/sign-out', null).pipe(
      tap({
        finalize: () => {
          this.leaving = false;
          this.forget();
        },
      }),
    );
  }

  /** Changes the signed-in user's own password; the server ends their other sessions, this one stays. */
  changePassword(request: ChangePasswordRequest): Observable<void> {
    return this.http.post<void>('/api/me/password', request);
  }

  /** Drops the local knowledge of the user (after sign-out, or when the server says 401). */
  forget(): void {
    this.current.set(null);
    this.restoring = Promise.resolve(null);
  }
}
