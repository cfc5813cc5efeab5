/**
 * Every bench-scoped route, for the access test in server/middleware/bench-access.spec.ts:
 * a non-member gets 404, roles below `minRole` get 403, nobody signed out gets in.
 * Modules that add routes under /api/benches/:benchId append their rows here. Ids in paths may be
 * made up: the loader and `requireRole` must refuse before the route looks anything up.
 */
import type { Role } from '../../shared/api/types';

export interface BenchRouteCase {
  method: 'get' | 'post' | 'patch' | 'put' | 'delete';
  /** Path after /api/benches/:benchId ('' for the bench itself). */
  path: (ids: { someUserId: string }) => string;
  minRole: Role;
  /** A valid body, so a refusal is about access and not about validation. */
  body?: unknown;
  /** For GET rows: the status an allowed role gets (default 200; 404 when the path uses a made-up id). */
  allowedStatus?: number;
}

const madeUpId = '3f1c2a4e-8b7d-4c6a-9e2f-1a2b3c4d5e6f';

export const benchRouteTable: BenchRouteCase[] = [
  { method: 'get', path: () => '', minRole: 'viewer' },
  { method: 'patch', path: () => '', minRole: 'owner', body: { name: 'Renamed' } },
  { method: 'delete', path: () => '', minRole: 'owner' },
  { method: 'get', path: () => '/members', minRole: 'viewer' },
  { method: 'patch', path: (ids) => `/members/${ids.someUserId}`, minRole: 'coach', body: { role: 'viewer' } },
  // Anyone may remove themselves; removing someone else needs coach (checked in the route).
  { method: 'delete', path: (ids) => `/members/${ids.someUserId}`, minRole: 'coach' },
  { method: 'get', path: () => '/invitations', minRole: 'coach' },
  { method: 'post', path: () => '/invitations', minRole: 'coach', body: { email: 'new.person@example.org', role: 'member' } },
  { method: 'delete', path: () => `/invitations/${madeUpId}`, minRole: 'coach' },
  { method: 'get', path: () => '/activity', minRole: 'coach' },
];

// Corpora (server/modules/corpora). Made-up corpus ids: the role check comes before the lookup.
benchRouteTable.push(
  { method: 'get', path: () => '/corpora', minRole: 'viewer' },
  { method: 'post', path: () => '/corpora/preview', minRole: 'member' },
  { method: 'post', path: () => '/corpora', minRole: 'member' },
  { method: 'patch', path: () => `/corpora/${madeUpId}`, minRole: 'member', body: { name: 'Renamed' } },
  { method: 'delete', path: () => `/corpora/${madeUpId}`, minRole: 'member' },
);

// Runs (server/modules/runs). Reads of one run (GET /runs/:runId, its metrics, checkpoints and files) need a
// real run, so run-status.routes.spec.ts checks them; every write is here with a made-up run id.
benchRouteTable.push(
  { method: 'get', path: () => '/runs', minRole: 'viewer' },
  { method: 'post', path: () => '/runs', minRole: 'member', body: { family: 'ngram', name: 'Trigram', corpusId: madeUpId, settings: { model: { order: 3 } } } },
  { method: 'post', path: () => '/runs/import', minRole: 'member' },
  { method: 'patch', path: () => `/runs/${madeUpId}`, minRole: 'member', body: { status: 'training' } },
  { method: 'post', path: () => `/runs/${madeUpId}/archive`, minRole: 'member', body: { archived: true } },
  { method: 'delete', path: () => `/runs/${madeUpId}`, minRole: 'member' },
  { method: 'post', path: () => `/runs/${madeUpId}/metrics`, minRole: 'member', body: { points: [{ series: 'train_bound', step: 1, value: -2 }] } },
  { method: 'delete', path: () => `/runs/${madeUpId}/metrics?afterStep=0`, minRole: 'member' },
  { method: 'post', path: () => `/runs/${madeUpId}/checkpoints`, minRole: 'member' },
);

// Evaluations, grids, learnability checks and reports (server/modules/evaluations, grids, reports). Reads of one
// evaluation / grid / report need real rows, so their specs check them; writes use made-up ids.
benchRouteTable.push(
  { method: 'get', path: () => '/evaluations', minRole: 'viewer' },
  { method: 'get', path: () => `/evaluations/${madeUpId}`, minRole: 'viewer', allowedStatus: 404 },
  { method: 'post', path: () => `/runs/${madeUpId}/checkpoints/${madeUpId}/evaluations`, minRole: 'member', body: { settings: { K: 256 }, results: {} } },
  { method: 'get', path: () => '/grids', minRole: 'viewer' },
  { method: 'get', path: () => `/grids/${madeUpId}`, minRole: 'viewer', allowedStatus: 404 },
  { method: 'get', path: () => `/grids/${madeUpId}/verdict`, minRole: 'viewer', allowedStatus: 404 },
  {
    method: 'post', path: () => '/grids', minRole: 'member',
    body: { name: 'Sizes', corpusId: madeUpId, family: 'gru', baseSettings: { model: { embeddingSize: 4, observationHidden: 0 }, training: { steps: 10, batchSize: 4, learningRate: 0.01 } }, axes: [{ key: 'model.stateSize', values: [8, 16] }] },
  },
  { method: 'delete', path: () => `/grids/${madeUpId}`, minRole: 'member' },
  { method: 'post', path: () => `/corpora/${madeUpId}/learnability`, minRole: 'member', body: { budgetSteps: 10 } },
  { method: 'get', path: () => '/reports', minRole: 'viewer' },
  { method: 'get', path: () => `/reports/${madeUpId}`, minRole: 'viewer', allowedStatus: 404 },
  { method: 'get', path: () => `/reports/${madeUpId}/export.csv`, minRole: 'viewer', allowedStatus: 404 },
  { method: 'get', path: () => `/reports/${madeUpId}/export.json`, minRole: 'viewer', allowedStatus: 404 },
  { method: 'post', path: () => '/reports', minRole: 'member', body: { kind: 'grid', title: 'Sizes', sourceIds: [madeUpId] } },
  { method: 'delete', path: () => `/reports/${madeUpId}`, minRole: 'member' },
);

// Runners (server/modules/runners). `GET /events` is a never-ending stream, so run-events.spec.ts checks its
// access (401 / 404) instead of this table; the per-run stream looks the run up first, so a made-up id gets 404.
benchRouteTable.push(
  { method: 'get', path: () => '/runner-status', minRole: 'viewer' },
  { method: 'post', path: () => `/runs/${madeUpId}/control`, minRole: 'member', body: { action: 'pause' } },
  { method: 'get', path: () => `/runs/${madeUpId}/events`, minRole: 'viewer', allowedStatus: 404 },
);

// Evaluations sent to runners (server/modules/evaluation-jobs). Made-up ids: the role check comes before the lookup.
benchRouteTable.push(
  { method: 'get', path: () => `/runs/${madeUpId}/checkpoints/${madeUpId}/evaluation-requests`, minRole: 'viewer', allowedStatus: 404 },
  { method: 'post', path: () => `/runs/${madeUpId}/checkpoints/${madeUpId}/evaluation-requests`, minRole: 'member', body: { settings: { K: 64 } } },
  { method: 'get', path: () => `/evaluation-requests/${madeUpId}`, minRole: 'viewer', allowedStatus: 404 },
  { method: 'delete', path: () => `/evaluation-requests/${madeUpId}`, minRole: 'member', allowedStatus: 404 },
);
