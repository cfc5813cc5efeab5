import { Routes } from '@angular/router';

export const RUNS_ROUTES: Routes = [
  {
    path: '',
    title: 'Runs · Noisewright',
    loadComponent: () => import('./run-list/run-list').then((m) => m.RunList),
  },
  {
    path: 'new',
    title: 'New run · Noisewright',
    loadComponent: () => import('./new-run/new-run').then((m) => m.NewRun),
  },
  {
    path: ':runId',
    title: 'Run · Noisewright',
    loadComponent: () => import('./run-view/run-view').then((m) => m.RunView),
  },
];
