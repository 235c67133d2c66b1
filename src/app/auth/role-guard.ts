import { inject } from '@angular/core';
import { CanActivateFn, Router } from '@angular/router';
import type { Role } from '../../../shared/contracts/api';
import { Session } from './session';

/**
 * Lets through only the roles listed in the route's `data.roles`; others see the no-access page.
 * Signed-out users go to sign-in (the auth guard normally catches them first).
 */
export const roleGuard: CanActivateFn = async (route, state) => {
  const router = inject(Router);
  const me = await inject(Session).restore();
  if (!me) {
    return router.createUrlTree(['/sign-in'], { queryParams: { returnUrl: state.url } });
  }
  const roles = (route.data['roles'] ?? []) as readonly Role[];
  return roles.includes(me.role) ? true : router.createUrlTree(['/no-access']);
};
