import { Routes } from '@angular/router';
import { openBenchGuard } from './benches/open-bench.guard';
import { adminGuard, signedInGuard } from './core/auth-guards';

export const routes: Routes = [
  { path: '', pathMatch: 'full', redirectTo: 'benches' },
  { path: '', loadChildren: () => import('./auth/auth.routes').then((m) => m.AUTH_ROUTES) },
  {
    path: 'invite/:token',
    title: 'Invitation · Noisewright',
    loadComponent: () => import('./invite/accept-invitation/accept-invitation').then((m) => m.AcceptInvitation),
  },
  {
    path: 'benches/:benchId/corpora',
    canActivate: [signedInGuard, openBenchGuard],
    loadChildren: () => import('./corpora/corpora.routes').then((m) => m.CORPORA_ROUTES),
  },
  {
    path: 'benches/:benchId/runs/:runId/checkpoints/:checkpointId/evaluation',
    canActivate: [signedInGuard, openBenchGuard],
    loadChildren: () => import('./evaluation/evaluation.routes').then((m) => m.EVALUATION_ROUTES),
  },
  {
    path: 'benches/:benchId/runs',
    canActivate: [signedInGuard, openBenchGuard],
    loadChildren: () => import('./runs/runs.routes').then((m) => m.RUNS_ROUTES),
  },
  {
    path: 'benches/:benchId/compare',
    canActivate: [signedInGuard, openBenchGuard],
    loadChildren: () => import('./compare/compare.routes').then((m) => m.COMPARE_ROUTES),
  },
  {
    path: 'benches/:benchId/grids',
    canActivate: [signedInGuard, openBenchGuard],
    loadChildren: () => import('./grids/grids.routes').then((m) => m.GRID_ROUTES),
  },
  {
    path: 'benches/:benchId/reports',
    canActivate: [signedInGuard, openBenchGuard],
    loadChildren: () => import('./reports/reports.routes').then((m) => m.REPORT_ROUTES),
  },
  {
    path: 'benches',
    canActivate: [signedInGuard],
    loadChildren: () => import('./benches/benches.routes').then((m) => m.BENCHES_ROUTES),
  },
  {
    path: 'account',
    canActivate: [signedInGuard],
    loadChildren: () => import('./account/account.routes').then((m) => m.ACCOUNT_ROUTES),
  },
  {
    path: 'admin',
    canActivate: [adminGuard],
    loadChildren: () => import('./admin/admin.routes').then((m) => m.ADMIN_ROUTES),
  },
  {
    path: '**',
    title: 'Page not found · Noisewright',
    loadComponent: () => import('./ui/not-found/not-found').then((m) => m.NotFound),
  },
];
