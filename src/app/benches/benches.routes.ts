import { Routes } from '@angular/router';

export const BENCHES_ROUTES: Routes = [
  {
    path: '',
    title: 'Benches · Noisewright',
    loadComponent: () => import('./bench-list/bench-list').then((m) => m.BenchList),
  },
  {
    path: ':benchId',
    title: 'Bench · Noisewright',
    loadComponent: () => import('./bench-page/bench-page').then((m) => m.BenchPage),
  },
];
