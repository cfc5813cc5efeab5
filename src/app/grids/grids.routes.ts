import { Routes } from '@angular/router';

export const GRID_ROUTES: Routes = [
  {
    path: '',
    title: 'Grids · Noisewright',
    loadComponent: () => import('./grid-list/grid-list').then((m) => m.GridList),
  },
  {
    path: 'new',
    title: 'New grid · Noisewright',
    loadComponent: () => import('./grid-form/grid-form').then((m) => m.GridForm),
  },
  {
    path: ':gridId',
    title: 'Grid · Noisewright',
    loadComponent: () => import('./grid-view/grid-view').then((m) => m.GridView),
  },
];
