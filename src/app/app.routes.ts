import { Routes } from '@angular/router';
import { authGuard } from './auth/auth-guard';
import { roleGuard } from './auth/role-guard';
import { rolesFor } from './shell/nav-items';

export const routes: Routes = [
  {
    path: 'sign-in',
    title: 'Sign in · Brightward',
    loadComponent: () => import('./auth/sign-in').then((m) => m.SignIn),
  },
  {
    path: '',
    canActivate: [authGuard],
    loadComponent: () => import('./shell/shell').then((m) => m.Shell),
    children: [
      // Every role lands on its sites until role-specific boards exist.
      { path: '', pathMatch: 'full', redirectTo: 'sites' },
      {
        path: 'sites',
        canActivate: [roleGuard],
        data: { roles: rolesFor('/sites') },
        loadChildren: () => import('./sites/sites.routes').then((m) => m.sitesRoutes),
      },
      {
        path: 'admin',
        canActivate: [roleGuard],
        data: { roles: ['admin'] },
        loadChildren: () => import('./admin/admin.routes').then((m) => m.adminRoutes),
      },
      {
        path: 'no-access',
        title: 'No access · Brightward',
        loadComponent: () => import('./auth/no-access').then((m) => m.NoAccess),
      },
      {
        path: '**',
        title: 'Page not found · Brightward',
        loadComponent: () => import('./shell/not-found').then((m) => m.NotFound),
      },
    ],
  },
];
