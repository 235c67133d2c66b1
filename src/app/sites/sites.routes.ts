import { Routes } from '@angular/router';

export const sitesRoutes: Routes = [
  { path: '', title: 'Sites · Brightward', loadComponent: () => import('./site-list').then((m) => m.SiteList) },
  { path: ':id', title: 'Site · Brightward', loadComponent: () => import('./site-detail').then((m) => m.SiteDetail) },
];
