import { Routes } from '@angular/router';

/** Mounted at `/benches/:benchId/runs/:runId/checkpoints/:checkpointId/evaluation`. */
export const EVALUATION_ROUTES: Routes = [
  {
    path: '',
    title: 'Evaluation · Noisewright',
    loadComponent: () => import('./evaluation-page/evaluation-page').then((m) => m.EvaluationPage),
  },
];
