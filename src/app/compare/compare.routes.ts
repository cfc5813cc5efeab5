import { Routes } from '@angular/router';

export const COMPARE_ROUTES: Routes = [
  {
    path: '',
    title: 'Compare · Noisewright',
    loadComponent: () => import('./compare-home/compare-home').then((m) => m.CompareHome),
  },
];
