import { Routes } from '@angular/router';

export const ADMIN_ROUTES: Routes = [
  {
    path: '',
    title: 'Admin · Noisewright',
    loadComponent: () => import('./admin-page/admin-page').then((m) => m.AdminPage),
  },
  {
    path: 'runners',
    title: 'Runners · Noisewright',
    loadComponent: () => import('../runners/runners-page/runners-page').then((m) => m.RunnersPage),
  },
];
