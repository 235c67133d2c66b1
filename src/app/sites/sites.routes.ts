import { Routes } from '@angular/router';

export const sitesRoutes: Routes = [
  { path: '', title: 'Sites · Brightward', loadComponent: () => import('./site-list').then((m) => m.SiteList) },
  { path: ':id', title: 'Site · Brightward', loadComponent: () => import('./site-detail').then((m) => m.SiteDetail) },
  {
    path: ':id/statements',
    title: 'Monthly statement · Brightward',
    loadComponent: () => import('../statements/statement-page').then((m) => m.StatementPage),
  },
  {
    path: ':id/statements/:month',
    title: 'Monthly statement · Brightward',
    loadComponent: () => import('../statements/statement-page').then((m) => m.StatementPage),
  },
];
