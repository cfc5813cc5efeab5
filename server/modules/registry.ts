/**
 * The registration point for server modules. A module lists its routers here:
 * - `routes` mount under `/api/<path>`, optionally behind `requireAuth`;
 * - `benchRoutes` mount under `/api/benches/:benchId/<path>`, behind `requireAuth` and the bench loader,
 *   so their handlers can call `currentBench(req)` and guard themselves with `requireRole(...)`.
 * See DEVELOPERS.md, "Adding a server module".
 */
import type { Router } from 'express';
import type { AppContext } from '../app-context';
import { accountDeletionRoutes } from './account-deletion/account-deletion.routes';
import { activityRoutes } from './activity/activity.routes';
import { adminRoutes } from './admin/admin.routes';
import { authRoutes } from './auth/auth.routes';
import { corporaRoutes } from './corpora/corpora.routes';
import { benchEvaluationRoutes, checkpointEvaluationRoutes } from './evaluations/evaluations.routes';
import { gridRoutes } from './grids/grids.routes';
import { learnabilityRoutes } from './grids/learnability.routes';
import { reportRoutes } from './reports/reports.routes';
import { trainingSetRoutes } from './corpora/training-set.routes';
import { benchListRoutes, benchRoutes } from './benches/benches.routes';
import { memberRoutes } from './benches/members.routes';
import { invitationLinkRoutes } from './invitations/invitation-links.routes';
import { invitationRoutes } from './invitations/invitations.routes';
import { metaRoutes } from './meta/meta.routes';
import { runRoutes } from './runs/runs.routes';
import { runnerBenchRoutes } from './runners/runner-bench.routes';
import { runnerJobRoutes } from './runners/runner-jobs.routes';
import { runnerAdminRoutes } from './runners/runners.routes';
import { benchEvaluationRequestRoutes, checkpointEvaluationRequestRoutes } from './evaluation-jobs/evaluation-requests.routes';

export interface ServerModule {
  name: string;
  routes?: { path: string; signedIn: boolean; router: (ctx: AppContext) => Router }[];
  benchRoutes?: { path: string; router: (ctx: AppContext) => Router }[];
}

export const serverModules: ServerModule[] = [
  { name: 'meta', routes: [{ path: '/', signedIn: false, router: metaRoutes }] },
  { name: 'auth', routes: [{ path: '/auth', signedIn: false, router: authRoutes }] },
  { name: 'account-deletion', routes: [{ path: '/auth/account', signedIn: true, router: accountDeletionRoutes }] },
  {
    name: 'benches',
    routes: [{ path: '/benches', signedIn: true, router: benchListRoutes }],
    benchRoutes: [
      { path: '/', router: benchRoutes },
      { path: '/members', router: memberRoutes },
    ],
  },
  {
    name: 'invitations',
    routes: [{ path: '/invitations', signedIn: false, router: invitationLinkRoutes }],
    benchRoutes: [{ path: '/invitations', router: invitationRoutes }],
  },
  { name: 'activity', benchRoutes: [{ path: '/activity', router: activityRoutes }] },
  { name: 'corpora', benchRoutes: [{ path: '/corpora', router: corporaRoutes }] },
  {
    name: 'runs',
    benchRoutes: [
      { path: '/runs', router: runRoutes },
      { path: '/corpora', router: trainingSetRoutes },
    ],
  },
  {
    name: 'evaluations',
    benchRoutes: [
      { path: '/runs', router: checkpointEvaluationRoutes },
      { path: '/evaluations', router: benchEvaluationRoutes },
    ],
  },
  {
    name: 'grids',
    benchRoutes: [
      { path: '/grids', router: gridRoutes },
      { path: '/corpora', router: learnabilityRoutes },
    ],
  },
  { name: 'reports', benchRoutes: [{ path: '/reports', router: reportRoutes }] },
  { name: 'admin', routes: [{ path: '/admin', signedIn: true, router: adminRoutes }] },
  {
    name: 'runners',
    routes: [
      { path: '/runners', signedIn: true, router: runnerAdminRoutes },
      { path: '/runner', signedIn: false, router: runnerJobRoutes },
    ],
    benchRoutes: [{ path: '/', router: runnerBenchRoutes }],
  },
  {
    name: 'evaluation-jobs',
    benchRoutes: [
      { path: '/runs', router: checkpointEvaluationRequestRoutes },
      { path: '/evaluation-requests', router: benchEvaluationRequestRoutes },
    ],
  },
];
