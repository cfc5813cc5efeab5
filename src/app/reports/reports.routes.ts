import { Routes } from '@angular/router';

export const REPORT_ROUTES: Routes = [
  {
    path: ':reportId',
    title: 'Report · Noisewright',
    loadComponent: () => import('./report-page/report-page').then((m) => m.ReportPage),
  },
];
