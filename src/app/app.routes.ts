import { inject } from '@angular/core';
import { Router, Routes } from '@angular/router';
import { Session } from './auth/session';
import { authGuard } from './auth/auth-guard';
import { roleGuard } from './auth/role-guard';
import { rolesWith } from '../../shared/contracts/permissions';
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
      // Crews land on their work, the control room on the fleet board, owners on their sites.
      {
        path: '',
        pathMatch: 'full',
        children: [],
        canActivate: [
          async () => {
            const router = inject(Router);
            const me = await inject(Session).restore();
            if (me && rolesFor('/my-work').includes(me.role)) return router.createUrlTree(['/my-work']);
            if (me && rolesFor('/portfolio').includes(me.role)) return router.createUrlTree(['/portfolio']);
            return router.createUrlTree([me && rolesFor('/fleet').includes(me.role) ? '/fleet' : '/sites']);
          },
        ],
      },
      {
        path: 'portfolio',
        title: 'Portfolio · Brightward',
        canActivate: [roleGuard],
        data: { roles: rolesFor('/portfolio') },
        loadComponent: () => import('./statements/portfolio').then((m) => m.Portfolio),
      },
      {
        path: 'fleet',
        title: 'Fleet board · Brightward',
        canActivate: [roleGuard],
        data: { roles: rolesFor('/fleet') },
        loadComponent: () => import('./fleet/fleet-board').then((m) => m.FleetBoard),
      },
      {
        path: 'alarms',
        title: 'Alarms · Brightward',
        canActivate: [roleGuard],
        data: { roles: rolesFor('/alarms') },
        loadComponent: () => import('./alarms/alarm-board').then((m) => m.AlarmBoard),
      },
      {
        path: 'my-work',
        title: 'My work · Brightward',
        canActivate: [roleGuard],
        data: { roles: rolesFor('/my-work'), mine: true },
        loadComponent: () => import('./tickets/ticket-board').then((m) => m.TicketBoard),
      },
      {
        path: 'tickets',
        title: 'Tickets · Brightward',
        canActivate: [roleGuard],
        data: { roles: rolesFor('/tickets') },
        loadComponent: () => import('./tickets/ticket-board').then((m) => m.TicketBoard),
      },
      {
        path: 'notifications',
        title: 'Notifications · Brightward',
        canActivate: [roleGuard],
        data: { roles: rolesFor('/notifications') },
        loadComponent: () => import('./notifications/notification-settings-page').then((m) => m.NotificationSettingsPage),
      },
      {
        path: 'tickets/:id',
        title: 'Ticket · Brightward',
        canActivate: [roleGuard],
        data: { roles: rolesFor('/tickets') },
        loadComponent: () => import('./tickets/ticket-detail').then((m) => m.TicketDetail),
      },
      {
        // Every role; owners get it read-only for their own sites' units (the API scopes the unit to them).
        path: 'units/:id',
        title: 'Unit · Brightward',
        canActivate: [roleGuard],
        data: { roles: rolesWith('openUnitPage') },
        loadComponent: () => import('./units/unit-view').then((m) => m.UnitView),
      },
      {
        path: 'traces',
        title: 'Trace explorer · Brightward',
        canActivate: [roleGuard],
        data: { roles: rolesFor('/traces') },
        loadComponent: () => import('./traces/trace-explorer').then((m) => m.TraceExplorer),
      },
      {
        path: 'landscape',
        title: 'Landscape · Brightward',
        canActivate: [roleGuard],
        data: { roles: rolesFor('/landscape') },
        loadComponent: () => import('./landscape/landscape-view').then((m) => m.LandscapeView),
      },
      {
        path: 'health-settings',
        title: 'Health settings · Brightward',
        canActivate: [roleGuard],
        data: { roles: rolesFor('/health-settings') },
        loadComponent: () => import('./health-settings/health-settings-page').then((m) => m.HealthSettingsPage),
      },
      {
        path: 'replay',
        title: 'Detector replay · Brightward',
        canActivate: [roleGuard],
        data: { roles: rolesFor('/replay') },
        loadComponent: () => import('./replay/detector-replay').then((m) => m.DetectorReplay),
      },
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
        // Every role: reached from the account menu.
        path: 'account/password',
        title: 'Change password · Brightward',
        loadComponent: () => import('./auth/change-password').then((m) => m.ChangePassword),
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
