import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ErrorCode } from '../../../shared/api/errors';
import { RUN_STATUSES, type RunDto, type RunStatus } from '../../../shared/api/runs';
import { bearer, countRows, createBenchFixture, createTestApp, type BenchFixture, type TestApp } from '../../testing/test-app';
import { BenchRepository } from '../benches/bench.repository';
import { MembershipRepository } from '../benches/membership.repository';
import { UserRepository } from '../users/user.repository';
import { createRun, setStatusDirectly, ssmRunBody, uploadCorpus } from './runs-test-helpers';

let t: TestApp;
let f: BenchFixture;
let run: RunDto;

beforeAll(async () => {
  t = await createTestApp();
  f = await createBenchFixture(t);
  const corpus = await uploadCorpus(t, f.benchId, f.tokens.member);
  run = await createRun(t, f.benchId, f.tokens.member, ssmRunBody(corpus.id, 'Machine'));
});
afterAll(async () => t.close());

const api = () => request(t.app);
const url = () => `/api/benches/${f.benchId}/runs/${run.id}`;

/**
 * The status machine as designed (written out by hand, not derived from the code): rows are the
 * current status, the listed statuses are the allowed next ones; staying put is always allowed.
 */
const DESIGN: Record<RunStatus, RunStatus[]> = {
  queued: ['training', 'stopped', 'failed'],
  training: ['paused', 'finished', 'stopped', 'failed', 'queued'],
  paused: ['training', 'queued', 'stopped', 'failed', 'finished'],
  finished: ['queued', 'training'],
  stopped: ['queued', 'training'],
  failed: ['queued', 'training'],
};
const ENDED: RunStatus[] = ['finished', 'stopped', 'failed'];
/** A pause or stop after the run ended: answered 200 with the unchanged run and a message (designed, not derived). */
const isLate = (from: RunStatus, to: RunStatus) => ENDED.includes(from) && (to === 'paused' || to === 'stopped') && from !== to;

const pairs = RUN_STATUSES.flatMap((from) => RUN_STATUSES.map((to) => [from, to] as const));

describe('status machine', () => {
  it.each(pairs)('%s → %s', async (from, to) => {
    await setStatusDirectly(t, run.id, from);
    const body = to === 'failed' ? { status: to, statusReason: 'The loss became NaN at step 12.' } : { status: to };
    const res = await api().patch(url()).set(bearer(f.tokens.member)).send(body);
    const allowed = from === to || DESIGN[from].includes(to);
    const late = isLate(from, to);
    expect(res.status).toBe(allowed || late ? 200 : 409);
    const stored: { status: string }[] = await t.orm.em.fork().getConnection().execute('select status from runs where id = ?', [run.id]);
    expect(stored[0]!.status).toBe(allowed ? to : from);
    if (late) {
      expect(res.body.status).toBe(from);
      expect(res.body.message).toMatch(/changed nothing/);
    }
    if (!allowed && !late) {
      expect(res.body.error.code).toBe(ErrorCode.RunStatusConflict);
      expect(res.body.error.message).toContain(`A run that is ${from} cannot become ${to}`);
    }
  });

  it('keeps a finished run finished when a pause arrives after the finish (one after the other, and at once)', async () => {
    await setStatusDirectly(t, run.id, 'training');
    const finish = await api().patch(url()).set(bearer(f.tokens.member)).send({ status: 'finished', stepsDone: 300 });
    expect(finish.status).toBe(200);
    const late = await api().patch(url()).set(bearer(f.tokens.member)).send({ status: 'paused', stepsDone: 299 });
    expect(late.status).toBe(200);
    expect(late.body).toMatchObject({ status: 'finished', stepsDone: 300 });
    expect(late.body.message).toContain('had already finished at step 300');

    // Both requests in flight together: whichever the server takes first, the run ends finished at step 300.
    for (let i = 0; i < 5; i++) {
      await setStatusDirectly(t, run.id, 'training');
      const [done, pause] = await Promise.all([
        api().patch(url()).set(bearer(f.tokens.member)).send({ status: 'finished', stepsDone: 300 }),
        api().patch(url()).set(bearer(f.tokens.member)).send({ status: 'paused' }),
      ]);
      expect(done.status).toBe(200);
      expect(pause.status).toBe(200);
      const stored: { status: string; steps_done: number }[] = await t.orm.em.fork().getConnection().execute('select status, steps_done from runs where id = ?', [run.id]);
      expect(stored[0]).toEqual({ status: 'finished', steps_done: 300 });
    }
  });

  it('needs a reason to mark a run failed, and keeps it', async () => {
    await setStatusDirectly(t, run.id, 'training');
    const bare = await api().patch(url()).set(bearer(f.tokens.member)).send({ status: 'failed' });
    expect(bare.status).toBe(422);
    expect(bare.body.error.fields.statusReason).toMatch(/why the run failed/);
    const res = await api().patch(url()).set(bearer(f.tokens.member)).send({ status: 'failed', statusReason: 'The loss became infinite at step 40; the last good checkpoint is kept.', stepsDone: 39 });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ status: 'failed', stepsDone: 39, statusReason: 'The loss became infinite at step 40; the last good checkpoint is kept.' });
    const activity = await api().get(`/api/benches/${f.benchId}/activity`).set(bearer(f.tokens.owner));
    expect(activity.body.items.map((e: { kind: string }) => e.kind)).toContain('run.failed');
    // Moving on clears the reason.
    const again = await api().patch(url()).set(bearer(f.tokens.member)).send({ status: 'training' });
    expect(again.body.statusReason).toBeNull();
  });

  it('merges summary updates and refuses unknown summary fields', async () => {
    await setStatusDirectly(t, run.id, 'training');
    await api().patch(url()).set(bearer(f.tokens.member)).send({ summary: { backend: 'wasm', threads: 1, simd: true, parameterCount: 321 } });
    const res = await api().patch(url()).set(bearer(f.tokens.member)).send({ stepsDone: 50, summary: { lastBoundBitsPerChar: 2.1, lastIsBound: true, wordsPerSecond: 812.5 } });
    expect(res.status).toBe(200);
    expect(res.body.summary).toEqual({ backend: 'wasm', threads: 1, simd: true, parameterCount: 321, lastBoundBitsPerChar: 2.1, lastIsBound: true, wordsPerSecond: 812.5 });
    expect(res.body.stepsDone).toBe(50);
    const bad = await api().patch(url()).set(bearer(f.tokens.member)).send({ summary: { colour: 'teal' } });
    expect(bad.status).toBe(422);
    const empty = await api().patch(url()).set(bearer(f.tokens.member)).send({});
    expect(empty.status).toBe(422);
  });
});

describe('who may control a run', () => {
  it('lets viewers read but not change it', async () => {
    const read = await api().get(url()).set(bearer(f.tokens.viewer));
    expect(read.status).toBe(200);
    expect(read.body.canControl).toBe(false);
    const change = await api().patch(url()).set(bearer(f.tokens.viewer)).send({ name: 'Mine now' });
    expect(change.status).toBe(403);
  });

  it('stops a member from controlling another member’s run; the creator, coaches and owners may', async () => {
    const other = await api().post('/api/auth/signup').send({ email: 'second.member@example.org', password: 'correct horse 42', displayName: 'Second member' });
    const em = t.orm.em.fork();
    const bench = (await new BenchRepository(em).findById(f.benchId))!;
    new MembershipRepository(em).add(bench, (await new UserRepository(em).findById(other.body.user.id))!, 'member', t.clock.now());
    await em.flush();

    const before = await countRows(t, 'runs');
    const refused = await api().patch(url()).set(bearer(other.body.token)).send({ name: 'Taken over' });
    expect(refused.status).toBe(403);
    expect(refused.body.error.code).toBe(ErrorCode.RoleTooLow);
    expect((await api().post(`${url()}/metrics`).set(bearer(other.body.token)).send({ points: [{ series: 'train_bound', step: 1, value: -3 }] })).status).toBe(403);
    expect((await api().delete(url()).set(bearer(other.body.token))).status).toBe(403);
    const listed = await api().get(`/api/benches/${f.benchId}/runs`).set(bearer(other.body.token));
    expect(listed.body.items.find((r: RunDto) => r.id === run.id).canControl).toBe(false);
    expect(await countRows(t, 'runs')).toBe(before);

    for (const who of ['coach', 'owner', 'admin', 'member'] as const) {
      const res = await api().patch(url()).set(bearer(f.tokens[who])).send({ name: `Renamed by ${who}` });
      expect(res.status).toBe(200);
      expect(res.body.canControl).toBe(true);
    }
    expect((await api().get(url()).set(bearer(f.tokens.viewer))).body.name).toBe('Renamed by member');
  });

  it.each(['', '/metrics', '/checkpoints'])('hides GET %s of a run from non-members (404) and shows it to viewers', async (suffix) => {
    const outsider = await api().get(`${url()}${suffix}`).set(bearer(f.tokens.outsider));
    expect(outsider.status).toBe(404);
    const viewer = await api().get(`${url()}${suffix}`).set(bearer(f.tokens.viewer));
    expect(viewer.status).toBe(200);
  });

  it('answers a run id of another bench with 404', async () => {
    const elsewhere = await api().post('/api/benches').set(bearer(f.tokens.member)).send({ name: 'Elsewhere' });
    const res = await api().get(`/api/benches/${elsewhere.body.id}/runs/${run.id}`).set(bearer(f.tokens.member));
    expect(res.status).toBe(404);
    const patch = await api().patch(`/api/benches/${elsewhere.body.id}/runs/${run.id}`).set(bearer(f.tokens.member)).send({ name: 'x' });
    expect(patch.status).toBe(404);
  });
});
