import { Routes } from '@angular/router';

export const ACCOUNT_ROUTES: Routes = [
  {
    path: '',
    title: 'Account · Noisewright',
    loadComponent: () => import('./account-page/account-page').then((m) => m.AccountPage),
  },
];
