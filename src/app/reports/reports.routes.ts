import { Routes } from '@angular/router';

export const REPORT_ROUTES: Routes = [
  {
    path: '',
    title: 'Reports · Noisewright',
    loadComponent: () => import('./report-list/report-list').then((m) => m.ReportList),
  },
  {
    path: ':reportId',
    title: 'Report · Noisewright',
    loadComponent: () => import('./report-page/report-page').then((m) => m.ReportPage),
  },
];
