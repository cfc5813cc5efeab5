import request from 'supertest';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { ErrorCode } from '../../../shared/api/errors';
import type { BenchSummary } from '../../../shared/api/types';
import {
  bearer,
  countAllRows,
  countRows,
  createBenchFixture,
  createTestApp,
  signUp,
  TEST_PASSWORD,
  type BenchFixture,
  type TestApp,
} from '../../testing/test-app';
import { createRun, ssmRunBody, uploadCorpus } from '../runs/runs-test-helpers';
import { AccountDeletion, listNames } from './account-deletion';

let t: TestApp;
let f: BenchFixture;
beforeEach(async () => {
  t = await createTestApp();
  f = await createBenchFixture(t, 'Tide pool');
});
afterEach(async () => {
  vi.restoreAllMocks();
  await t.close();
});

const api = () => request(t.app);
const emailOf = async (userId: string) =>
  ((await t.orm.em.fork().getConnection().execute('select email from users where id = ?', [userId])) as { email: string }[])[0]!.email;
const deleteAccount = (token: string, body: object) => api().delete('/api/auth/account').set(bearer(token)).send(body);

/** Every table the deletion touches, including the corpus tables that `countAllRows` leaves out. */
async function everyRowCount(): Promise<Record<string, number>> {
  return { ...(await countAllRows(t)), corpora: await countRows(t, 'corpora'), corpus_words: await countRows(t, 'corpus_words') };
}

async function one<T>(sql: string, params: unknown[]): Promise<T | undefined> {
  return ((await t.orm.em.fork().getConnection().execute(sql, params)) as T[])[0];
}

async function createBench(token: string, name: string): Promise<string> {
  const res = await api().post('/api/benches').set(bearer(token)).send({ name });
  expect(res.status).toBe(201);
  return (res.body as BenchSummary).id;
}

/** Invites `email` to a bench and returns the link token from the e-mail. */
async function invite(benchId: string, by: string, email: string, role: string): Promise<string> {
  const res = await api().post(`/api/benches/${benchId}/invitations`).set(bearer(by)).send({ email, role });
  expect(res.status).toBe(201);
  const mail = await t.mailbox.waitFor((m) => m.to === email && m.text.includes('/invite/'));
  t.mailbox.clear();
  return /\/invite\/([A-Za-z0-9_-]+)/.exec(mail.text)![1]!;
}

describe('DELETE /api/auth/account', () => {
  it('deletes the account: content in shared benches stays without a creator, a sole-member bench goes, tokens stop working', async () => {
    const coachEmail = await emailOf(f.userIds.coach);
    // In the shared bench: a corpus, a run on it, a report of the run, and an open invitation, all by the coach.
    const corpus = await uploadCorpus(t, f.benchId, f.tokens.coach);
    const run = await createRun(t, f.benchId, f.tokens.coach, ssmRunBody(corpus.id));
    const report = await api().post(`/api/benches/${f.benchId}/reports`).set(bearer(f.tokens.coach))
      .send({ kind: 'comparison', title: 'Coach notes', sourceIds: [run.id] });
    expect(report.status).toBe(201);
    await invite(f.benchId, f.tokens.coach, 'pending.guest@example.org', 'viewer');
    // A bench of the coach alone, with a corpus of its own.
    const soloId = await createBench(f.tokens.coach, 'Solo sketches');
    await uploadCorpus(t, soloId, f.tokens.coach, undefined, 'Solo words');
    // A bench with two owners: the outsider invites the coach as owner and the coach accepts.
    const duoId = await createBench(f.tokens.outsider, 'Duo desk');
    const duoToken = await invite(duoId, f.tokens.outsider, coachEmail, 'owner');
    expect((await api().post(`/api/invitations/${duoToken}/accept`).set(bearer(f.tokens.coach))).status).toBe(200);
    // A password-reset link.
    expect((await api().post('/api/auth/reset/request').send({ email: coachEmail })).status).toBe(202);
    // The link is stored and mailed after the answer (in the background): wait for the mail.
    await t.mailbox.waitFor((m) => m.to === coachEmail && /reset/i.test(m.subject));
    expect(await countRows(t, 'password_reset_tokens')).toBe(1);
    // A second token of the same person (another device).
    const other = await api().post('/api/auth/signin').send({ email: coachEmail, password: TEST_PASSWORD });
    expect(other.status).toBe(200);
    const before = await everyRowCount();
    t.clock.advance(60_000);

    const res = await deleteAccount(f.tokens.coach, { password: TEST_PASSWORD, confirmEmail: ` ${coachEmail.toUpperCase()} ` });
    expect(res.status).toBe(204);

    // The person and everything that was only theirs are gone.
    expect(await one('select id from users where id = ?', [f.userIds.coach])).toBeUndefined();
    expect(await countRows(t, 'users')).toBe(before['users']! - 1);
    expect(await one('select id from memberships where user_id = ?', [f.userIds.coach])).toBeUndefined();
    expect(await countRows(t, 'password_reset_tokens')).toBe(0);
    expect(await one('select id from benches where id = ?', [soloId])).toBeUndefined();
    expect(await one("select id from corpora where name = 'Solo words'", [])).toBeUndefined();
    // Invitations: the open one they sent and the one they accepted (it holds their address) are gone.
    expect(await one("select id from invitations where email = 'pending.guest@example.org'", [])).toBeUndefined();
    expect(await one('select id from invitations where email = ?', [coachEmail])).toBeUndefined();

    // What they made in the shared bench stays, without a creator.
    expect(await one('select uploaded_by_id as u from corpora where id = ?', [corpus.id])).toEqual({ u: null });
    expect(await one('select created_by_id as u from runs where id = ?', [run.id])).toEqual({ u: null });
    expect(await one('select created_by_id as u from reports where id = ?', [(report.body as { id: string }).id])).toEqual({ u: null });
    expect(await countRows(t, 'corpus_words')).toBeGreaterThan(0);
    const runSeen = await api().get(`/api/benches/${f.benchId}/runs/${run.id}`).set(bearer(f.tokens.owner));
    expect(runSeen.status).toBe(200);
    expect(runSeen.body.createdBy).toBeNull();
    // Nobody's activity line still points at the account; the shared bench and the duo bench record the departure.
    expect(await one('select count(*) as n from activity_events where actor_id = ?', [f.userIds.coach])).toEqual({ n: 0 });
    const log = await api().get(`/api/benches/${f.benchId}/activity`).set(bearer(f.tokens.owner));
    expect(log.body.items[0]).toMatchObject({ kind: 'member.account_deleted', actor: null, createdAt: t.clock.now().toISOString() });
    expect(log.body.items[0].summary).toContain('deleted their account');
    const duoLog = await api().get(`/api/benches/${duoId}/activity`).set(bearer(f.tokens.outsider));
    expect(duoLog.body.items[0]).toMatchObject({ kind: 'member.account_deleted', actor: null });
    // The duo bench lives on with its other owner.
    const duo = await api().get(`/api/benches/${duoId}`).set(bearer(f.tokens.outsider));
    expect(duo.status).toBe(200);
    expect(duo.body.memberCount).toBe(1);

    // Every token of the person answers 401, and the password no longer signs in.
    for (const token of [f.tokens.coach, (other.body as { token: string }).token]) {
      const me = await api().get('/api/auth/me').set(bearer(token));
      expect(me.status).toBe(401);
      expect(me.body.error.code).toBe(ErrorCode.NotSignedIn);
    }
    expect((await api().post('/api/auth/signin').send({ email: coachEmail, password: TEST_PASSWORD })).status).toBe(401);
    // The others are untouched.
    expect((await api().get('/api/auth/me').set(bearer(f.tokens.owner))).status).toBe(200);
  });

  it('refuses a wrong password with a sentence on the field, and changes nothing', async () => {
    const before = await everyRowCount();
    const res = await deleteAccount(f.tokens.member, { password: 'not the password', confirmEmail: await emailOf(f.userIds.member) });
    expect(res.status).toBe(422);
    expect(res.body.error.code).toBe(ErrorCode.ValidationFailed);
    expect(res.body.error.fields.password).toMatch(/password is wrong/);
    expect(await everyRowCount()).toEqual(before);
    expect((await api().get('/api/auth/me').set(bearer(f.tokens.member))).status).toBe(200);
  });

  it('refuses when the typed e-mail is not the account\'s, or fields are missing', async () => {
    const before = await everyRowCount();
    const wrong = await deleteAccount(f.tokens.member, { password: TEST_PASSWORD, confirmEmail: 'someone.else@example.org' });
    expect(wrong.status).toBe(422);
    expect(wrong.body.error.fields.confirmEmail).toContain(await emailOf(f.userIds.member));
    const empty = await deleteAccount(f.tokens.member, {});
    expect(empty.status).toBe(422);
    expect(Object.keys(empty.body.error.fields).sort()).toEqual(['confirmEmail', 'password']);
    expect(await everyRowCount()).toEqual(before);
  });

  it('refuses the only owner of benches with other members, naming the benches, and changes nothing', async () => {
    // A second bench where the owner is the only owner, with a viewer.
    const second = await createBench(f.tokens.owner, 'Kelp garden');
    const token = await invite(second, f.tokens.owner, await emailOf(f.userIds.viewer), 'viewer');
    expect((await api().post(`/api/invitations/${token}/accept`).set(bearer(f.tokens.viewer))).status).toBe(200);
    const before = await everyRowCount();

    const res = await deleteAccount(f.tokens.owner, { password: TEST_PASSWORD, confirmEmail: await emailOf(f.userIds.owner) });
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe(ErrorCode.LastOwner);
    expect(res.body.error.message).toContain('"Kelp garden" and "Tide pool"');
    expect(res.body.error.message).toContain('only owner');
    expect(res.body.error.message).toContain('Make another member owner');
    expect(await everyRowCount()).toEqual(before);
    expect((await api().get('/api/auth/me').set(bearer(f.tokens.owner))).status).toBe(200);
  });

  it('lets an owner go once another member is owner too', async () => {
    const promote = await api().patch(`/api/benches/${f.benchId}/members/${f.userIds.coach}`).set(bearer(f.tokens.owner)).send({ role: 'owner' });
    expect(promote.status).toBe(200);
    const res = await deleteAccount(f.tokens.owner, { password: TEST_PASSWORD, confirmEmail: await emailOf(f.userIds.owner) });
    expect(res.status).toBe(204);
    const members = await api().get(`/api/benches/${f.benchId}/members`).set(bearer(f.tokens.coach));
    expect((members.body as { userId: string }[]).map((m) => m.userId)).not.toContain(f.userIds.owner);
    expect(members.body).toHaveLength(3);
  });

  it('refuses the last admin of the instance, but not an admin when another admin remains', async () => {
    const before = await everyRowCount();
    const res = await deleteAccount(f.tokens.admin, { password: TEST_PASSWORD, confirmEmail: await emailOf(f.userIds.admin) });
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe(ErrorCode.LastAdmin);
    expect(res.body.error.message).toContain('only admin');
    expect(await everyRowCount()).toEqual(before);

    await t.orm.em.fork().getConnection().execute('update users set is_admin = 1 where id = ?', [f.userIds.outsider]);
    const second = await deleteAccount(f.tokens.admin, { password: TEST_PASSWORD, confirmEmail: await emailOf(f.userIds.admin) });
    expect(second.status).toBe(204);
  });

  it('answers 401 without a sign-in, and after sign-out', async () => {
    const before = await everyRowCount();
    const anonymous = await api().delete('/api/auth/account').send({ password: TEST_PASSWORD, confirmEmail: 'x@example.org' });
    expect(anonymous.status).toBe(401);
    expect(anonymous.body.error.code).toBe(ErrorCode.NotSignedIn);
    expect((await api().post('/api/auth/signout').set(bearer(f.tokens.viewer))).status).toBe(204);
    const stale = await deleteAccount(f.tokens.viewer, { password: TEST_PASSWORD, confirmEmail: await emailOf(f.userIds.viewer) });
    expect(stale.status).toBe(401);
    expect(await everyRowCount()).toEqual(before);
  });

  it('rolls everything back when a step fails part-way (after the sole-member bench was deleted)', async () => {
    const person = await signUp(t, 'lone.person@example.org', 'Lone');
    const soloId = await createBench(person.token, 'Lone lab');
    await uploadCorpus(t, soloId, person.token, undefined, 'Lone words');
    // A membership in the shared bench, so the activity line and the detaching steps run too.
    const token = await invite(f.benchId, f.tokens.owner, 'lone.person@example.org', 'member');
    expect((await api().post(`/api/invitations/${token}/accept`).set(bearer(person.token))).status).toBe(200);
    const before = await everyRowCount();
    const spy = vi.spyOn(AccountDeletion.prototype, 'forgetSignInSecrets').mockRejectedValue(new Error('disk went away'));

    const res = await deleteAccount(person.token, { password: TEST_PASSWORD, confirmEmail: 'lone.person@example.org' });
    expect(spy).toHaveBeenCalledTimes(1);
    expect(res.status).toBe(500);
    expect(t.takeServerErrors().map((e) => (e as Error).message)).toEqual(['disk went away']);
    expect(await everyRowCount()).toEqual(before);
    expect(await one('select name from benches where id = ?', [soloId])).toEqual({ name: 'Lone lab' });
    expect((await api().get('/api/auth/me').set(bearer(person.token))).status).toBe(200);

    spy.mockRestore();
    const again = await deleteAccount(person.token, { password: TEST_PASSWORD, confirmEmail: 'lone.person@example.org' });
    expect(again.status).toBe(204);
    expect(await one('select id from benches where id = ?', [soloId])).toBeUndefined();
  });
});

describe('listNames', () => {
  it('joins bench names the way the refusal sentence reads (from memory: English list punctuation without a serial comma)', () => {
    expect(listNames(['A'])).toBe('"A"');
    expect(listNames(['A', 'B'])).toBe('"A" and "B"');
    expect(listNames(['A', 'B', 'C'])).toBe('"A", "B" and "C"');
  });
});
