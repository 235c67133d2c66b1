import { Routes } from '@angular/router';
import { roleGuard } from '../auth/role-guard';
import { rolesFor } from '../shell/nav-items';

export const adminRoutes: Routes = [
  { path: '', pathMatch: 'full', redirectTo: 'people' },
  {
    path: 'people',
    title: 'People · Brightward',
    canActivate: [roleGuard],
    data: { roles: rolesFor('/admin/people') },
    loadComponent: () => import('./people/people-page').then((m) => m.PeoplePage),
  },
  {
    path: 'owners',
    title: 'Owners · Brightward',
    canActivate: [roleGuard],
    data: { roles: rolesFor('/admin/owners') },
    loadComponent: () => import('./owners/owners-page').then((m) => m.OwnersPage),
  },
  {
    path: 'sites',
    title: 'Site setup · Brightward',
    canActivate: [roleGuard],
    data: { roles: rolesFor('/admin/sites') },
    loadComponent: () => import('./sites/site-setup-page').then((m) => m.SiteSetupPage),
  },
  {
    path: 'units',
    title: 'Units and credentials · Brightward',
    canActivate: [roleGuard],
    data: { roles: rolesFor('/admin/units') },
    loadComponent: () => import('./units/units-page').then((m) => m.UnitsPage),
  },
  {
    path: 'outbox',
    title: 'Outbox · Brightward',
    canActivate: [roleGuard],
    data: { roles: rolesFor('/admin/outbox') },
    loadComponent: () => import('./outbox/outbox-page').then((m) => m.OutboxPage),
  },
  {
    path: 'audit',
    title: 'Audit log · Brightward',
    canActivate: [roleGuard],
    data: { roles: rolesFor('/admin/audit') },
    loadComponent: () => import('./audit/audit-page').then((m) => m.AuditPage),
  },
];
