import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ErrorCode } from '../../../shared/api/errors';
import type { BenchSummary, Member } from '../../../shared/api/types';
import { UserRepository } from '../users/user.repository';
import { BenchRepository } from './bench.repository';
import { MembershipRepository } from './membership.repository';
import { bearer, countAllRows, countRows, createBenchFixture, createTestApp, signUp, type BenchFixture, type TestApp } from '../../testing/test-app';

let t: TestApp;
let f: BenchFixture;
beforeAll(async () => {
  t = await createTestApp();
  f = await createBenchFixture(t, 'Tide pool');
});
afterAll(async () => t.close());

const api = () => request(t.app);

describe('benches', () => {
  it('creates a bench with the caller as its only owner and logs it', async () => {
    const res = await api().post('/api/benches').set(bearer(f.tokens.member)).send({ name: '  Reed shed ', description: 'Names of boats' });
    expect(res.status).toBe(201);
    const bench = res.body as BenchSummary;
    expect(bench).toMatchObject({ name: 'Reed shed', description: 'Names of boats', role: 'owner', memberCount: 1 });
    const members = await api().get(`/api/benches/${bench.id}/members`).set(bearer(f.tokens.member));
    expect((members.body as Member[]).map((m) => [m.userId, m.role])).toEqual([[f.userIds.member, 'owner']]);
    const activity = await api().get(`/api/benches/${bench.id}/activity`).set(bearer(f.tokens.member));
    expect(activity.body.items.map((e: { kind: string }) => e.kind)).toEqual(['bench.created']);
  });

  it('refuses a bench without a name with 422 and writes nothing', async () => {
    const before = await countAllRows(t);
    const res = await api().post('/api/benches').set(bearer(f.tokens.member)).send({ name: '   ', description: 7 });
    expect(res.status).toBe(422);
    expect(Object.keys(res.body.error.fields).sort()).toEqual(['description', 'name']);
    expect(await countAllRows(t)).toEqual(before);
  });

  it('lists only my benches with my role; the admin sees every bench', async () => {
    const mine = await api().get('/api/benches').set(bearer(f.tokens.viewer));
    expect((mine.body as BenchSummary[]).map((b) => [b.name, b.role, b.memberCount])).toEqual([['Tide pool', 'viewer', 4]]);
    const outsider = await api().get('/api/benches').set(bearer(f.tokens.outsider));
    expect(outsider.body).toEqual([]);
    const admin = await api().get('/api/benches').set(bearer(f.tokens.admin));
    expect((admin.body as BenchSummary[]).map((b) => b.name).sort()).toEqual(['Reed shed', 'Tide pool']);
    expect((admin.body as BenchSummary[]).every((b) => b.role === 'owner')).toBe(true);
  });

  it('lets the owner rename; an empty update is refused with 422', async () => {
    const res = await api().patch(`/api/benches/${f.benchId}`).set(bearer(f.tokens.owner)).send({ name: 'Tide pool II' });
    expect(res.status).toBe(200);
    expect(res.body.name).toBe('Tide pool II');
    const empty = await api().patch(`/api/benches/${f.benchId}`).set(bearer(f.tokens.owner)).send({});
    expect(empty.status).toBe(422);
    const read = await api().get(`/api/benches/${f.benchId}`).set(bearer(f.tokens.viewer));
    expect(read.body.name).toBe('Tide pool II');
  });
});

describe('members', () => {
  it('owner changes roles; the change is logged', async () => {
    const res = await api().patch(`/api/benches/${f.benchId}/members/${f.userIds.member}`).set(bearer(f.tokens.owner)).send({ role: 'coach' });
    expect(res.status).toBe(200);
    expect(res.body.role).toBe('coach');
    const back = await api().patch(`/api/benches/${f.benchId}/members/${f.userIds.member}`).set(bearer(f.tokens.owner)).send({ role: 'member' });
    expect(back.body.role).toBe('member');
    const log = await api().get(`/api/benches/${f.benchId}/activity`).set(bearer(f.tokens.coach));
    expect(log.body.items.filter((e: { kind: string }) => e.kind === 'member.role_changed')).toHaveLength(2);
  });

  it('a coach may switch between member and viewer only', async () => {
    const toViewer = await api().patch(`/api/benches/${f.benchId}/members/${f.userIds.member}`).set(bearer(f.tokens.coach)).send({ role: 'viewer' });
    expect(toViewer.status).toBe(200);
    const toCoach = await api().patch(`/api/benches/${f.benchId}/members/${f.userIds.member}`).set(bearer(f.tokens.coach)).send({ role: 'coach' });
    expect(toCoach.status).toBe(403);
    const demoteOwner = await api().patch(`/api/benches/${f.benchId}/members/${f.userIds.owner}`).set(bearer(f.tokens.coach)).send({ role: 'member' });
    expect(demoteOwner.status).toBe(403);
    await api().patch(`/api/benches/${f.benchId}/members/${f.userIds.member}`).set(bearer(f.tokens.coach)).send({ role: 'member' });
  });

  it('an unknown role is refused with 422 naming the choices', async () => {
    const res = await api().patch(`/api/benches/${f.benchId}/members/${f.userIds.member}`).set(bearer(f.tokens.owner)).send({ role: 'boss' });
    expect(res.status).toBe(422);
    expect(res.body.error.fields.role).toMatch(/owner, coach, member, viewer/);
  });

  it('protects the last owner from demotion and from leaving', async () => {
    const demote = await api().patch(`/api/benches/${f.benchId}/members/${f.userIds.owner}`).set(bearer(f.tokens.owner)).send({ role: 'coach' });
    expect(demote.status).toBe(409);
    expect(demote.body.error.code).toBe(ErrorCode.LastOwner);
    const leave = await api().delete(`/api/benches/${f.benchId}/members/${f.userIds.owner}`).set(bearer(f.tokens.owner));
    expect(leave.status).toBe(409);
    // With a second owner, the first may step down.
    await api().patch(`/api/benches/${f.benchId}/members/${f.userIds.coach}`).set(bearer(f.tokens.owner)).send({ role: 'owner' });
    const stepDown = await api().patch(`/api/benches/${f.benchId}/members/${f.userIds.owner}`).set(bearer(f.tokens.owner)).send({ role: 'coach' });
    expect(stepDown.status).toBe(200);
    // Restore: the new owner makes the old one owner again and returns to coach.
    await api().patch(`/api/benches/${f.benchId}/members/${f.userIds.owner}`).set(bearer(f.tokens.coach)).send({ role: 'owner' });
    const restore = await api().patch(`/api/benches/${f.benchId}/members/${f.userIds.coach}`).set(bearer(f.tokens.owner)).send({ role: 'coach' });
    expect(restore.status).toBe(200);
  });

  it('anyone may leave; a coach cannot remove an owner; an owner can remove anyone else', async () => {
    const extra = await signUp(t, 'passer.by@example.org', 'Passer By');
    const em = t.orm.em.fork();
    const bench = (await new BenchRepository(em).findById(f.benchId))!;
    new MembershipRepository(em).add(bench, (await new UserRepository(em).findById(extra.user.id))!, 'viewer', t.clock.now());
    await em.flush();
    const coachOnOwner = await api().delete(`/api/benches/${f.benchId}/members/${f.userIds.owner}`).set(bearer(f.tokens.coach));
    expect(coachOnOwner.status).toBe(403);
    const leave = await api().delete(`/api/benches/${f.benchId}/members/${extra.user.id}`).set(bearer(extra.token));
    expect(leave.status).toBe(204);
    const after = await api().get(`/api/benches/${f.benchId}`).set(bearer(extra.token));
    expect(after.status).toBe(404);
    const gone = await api().delete(`/api/benches/${f.benchId}/members/${extra.user.id}`).set(bearer(f.tokens.owner));
    expect(gone.status).toBe(404);
  });
});

describe('deleting a bench', () => {
  it('removes the bench with its memberships, invitations and activity', async () => {
    const created = await api().post('/api/benches').set(bearer(f.tokens.viewer)).send({ name: 'Short-lived' });
    const id = created.body.id as string;
    await api().post(`/api/benches/${id}/invitations`).set(bearer(f.tokens.viewer)).send({ email: 'someone@example.org', role: 'member' });
    const before = { memberships: await countRows(t, 'memberships'), invitations: await countRows(t, 'invitations') };
    const res = await api().delete(`/api/benches/${id}`).set(bearer(f.tokens.viewer));
    expect(res.status).toBe(204);
    expect(await countRows(t, 'memberships')).toBe(before.memberships - 1);
    expect(await countRows(t, 'invitations')).toBe(before.invitations - 1);
    const rows: { n: number }[] = await t.orm.em.fork().getConnection().execute('select count(*) as n from activity_events where bench_id = ?', [id]);
    expect(Number(rows[0]!.n)).toBe(0);
    expect((await api().get(`/api/benches/${id}`).set(bearer(f.tokens.viewer))).status).toBe(404);
  });
});
