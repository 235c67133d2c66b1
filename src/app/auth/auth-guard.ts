import { inject } from '@angular/core';
import { CanActivateFn, Router } from '@angular/router';
import { Session } from './session';

/** Lets signed-in users through; everyone else goes to sign-in and comes back afterwards. */
export const authGuard: CanActivateFn = async (_route, state) => {
  const router = inject(Router);
  const me = await inject(Session).restore();
  return me ? true : router.createUrlTree(['/sign-in'], { queryParams: { returnUrl: state.url } });
};
