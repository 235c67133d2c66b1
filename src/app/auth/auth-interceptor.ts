import { HttpErrorResponse, HttpInterceptorFn } from '@angular/common/http';
import { inject } from '@angular/core';
import { Router } from '@angular/router';
import { catchError, throwError } from 'rxjs';
import { Session } from './session';

/** Requests whose 401/403 answers are handled by their callers, not by navigation. */
function handledByCaller(url: string): boolean {
  return url.includes('/api/auth/') || url.endsWith('/api/me');
}

/**
 * Sends the user to sign-in when the session has ended (401, keeping where they were) and to
 * the no-access page when the server refuses the role (403). The error still reaches the caller.
 */
export const authInterceptor: HttpInterceptorFn = (request, next) => {
  const router = inject(Router);
  const session = inject(Session);
  return next(request).pipe(
    catchError((error: unknown) => {
      if (error instanceof HttpErrorResponse && !handledByCaller(request.url)) {
        // A 401 racing a sign-out, or after the session was already dropped here, needs no second trip to sign-in.
        if (error.status === 401 && !session.signingOut && session.me()) {
          session.forget();
          const here = router.url;
          const returnUrl = here.startsWith('/sign-in') ? undefined : here;
          void router.navigate(['/sign-in'], { queryParams: { returnUrl } });
        } else if (error.status === 403) {
          void router.navigate(['/no-access']);
        }
      }
      return throwError(() => error);
    }),
  );
};
