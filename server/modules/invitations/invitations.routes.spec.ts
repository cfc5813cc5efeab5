import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ErrorCode } from '../../../shared/api/errors';
import type { Invitation, InvitationPreview } from '../../../shared/api/types';
import { bearer, countAllRows, createBenchFixture, createTestApp, signUp, type BenchFixture, type TestApp } from '../../testing/test-app';

let t: TestApp;
let f: BenchFixture;
beforeAll(async () => {
  // Sign-in tokens must outlive the clock jumps past invitation expiry below.
  t = await createTestApp({ JWT_TTL_SECONDS: String(365 * 24 * 3600) });
  f = await createBenchFixture(t, 'Lantern room');
});
afterAll(async () => t.close());

const api = () => request(t.app);
const DAY = 24 * 3600 * 1000;

/** Invites `email` as `role` (by the owner unless `by` is given) and returns the token from the e-mail. */
async function invite(email: string, role: string, by = f.tokens.owner): Promise<{ invitation: Invitation; token: string }> {
  const res = await api().post(`/api/benches/${f.benchId}/invitations`).set(bearer(by)).send({ email, role });
  expect(res.status).toBe(201);
  const mail = await t.mailbox.waitFor((m) => m.to === email && m.text.includes('/invite/'));
  t.mailbox.clear();
  const token = /\/invite\/([A-Za-z0-9_-]+)/.exec(mail.text)![1]!;
  expect(mail.subject).toContain('Lantern room');
  expect(mail.html).toContain(`http://workbench.test/invite/${token}`);
  return { invitation: res.body as Invitation, token };
}

describe('invitations', () => {
  it('invites a new person who signs up and accepts; the link then stops working', async () => {
    const { invitation, token } = await invite('new.comer@example.org', 'member');
    expect(invitation).toMatchObject({ email: 'new.comer@example.org', role: 'member' });
    expect(new Date(invitation.expiresAt).getTime() - new Date(invitation.createdAt).getTime()).toBe(7 * DAY);

    const preview = await api().get(`/api/invitations/${token}`);
    expect(preview.status).toBe(200);
    expect(preview.body as InvitationPreview).toMatchObject({ benchName: 'Lantern room', role: 'member', accountExists: false });

    const auth = await signUp(t, 'new.comer@example.org', 'New Comer');
    const accept = await api().post(`/api/invitations/${token}/accept`).set(bearer(auth.token));
    expect(accept.status).toBe(200);
    expect(accept.body).toEqual({ benchId: f.benchId });
    const bench = await api().get(`/api/benches/${f.benchId}`).set(bearer(auth.token));
    expect(bench.body.role).toBe('member');

    const again = await api().post(`/api/invitations/${token}/accept`).set(bearer(auth.token));
    expect(again.status).toBe(410);
    expect((await api().get(`/api/invitations/${token}`)).status).toBe(410);
    const log = await api().get(`/api/benches/${f.benchId}/activity`).set(bearer(f.tokens.coach));
    expect(log.body.items.map((e: { kind: string }) => e.kind)).toEqual(expect.arrayContaining(['invitation.sent', 'invitation.accepted']));
  });

  it('needs the signed-in e-mail to match the invited one', async () => {
    const { token } = await invite('right.person@example.org', 'viewer');
    const before = await countAllRows(t);
    const res = await api().post(`/api/invitations/${token}/accept`).set(bearer(f.tokens.outsider));
    expect(res.status).toBe(403);
    expect(res.body.error.code).toBe(ErrorCode.InvitationEmailMismatch);
    expect(await countAllRows(t)).toEqual(before);
    const right = await signUp(t, 'right.person@example.org');
    expect((await api().post(`/api/invitations/${token}/accept`).set(bearer(right.token))).status).toBe(200);
  });

  it('expires after 7 days', async () => {
    const { token } = await invite('late.comer@example.org', 'member');
    const auth = await signUp(t, 'late.comer@example.org');
    t.clock.advance(7 * DAY + 1000);
    const res = await api().post(`/api/invitations/${token}/accept`).set(bearer(auth.token));
    expect(res.status).toBe(410);
    expect(res.body.error.message).toMatch(/expired/);
    expect((await api().get(`/api/benches/${f.benchId}`).set(bearer(auth.token))).status).toBe(404);
    const pending = await api().get(`/api/benches/${f.benchId}/invitations`).set(bearer(f.tokens.coach));
    expect((pending.body as Invitation[]).some((i) => i.email === 'late.comer@example.org')).toBe(false);
  });

  it('still works just before the 7 days are over', async () => {
    const { token } = await invite('just.in.time@example.org', 'viewer');
    const auth = await signUp(t, 'just.in.time@example.org');
    t.clock.advance(7 * DAY - 60_000);
    expect((await api().post(`/api/invitations/${token}/accept`).set(bearer(auth.token))).status).toBe(200);
  });

  it('can be revoked, after which the link is dead', async () => {
    const { invitation, token } = await invite('second.thoughts@example.org', 'member', f.tokens.coach);
    const listed = await api().get(`/api/benches/${f.benchId}/invitations`).set(bearer(f.tokens.coach));
    expect((listed.body as Invitation[]).map((i) => i.id)).toContain(invitation.id);
    expect((await api().delete(`/api/benches/${f.benchId}/invitations/${invitation.id}`).set(bearer(f.tokens.coach))).status).toBe(204);
    const preview = await api().get(`/api/invitations/${token}`);
    expect(preview.status).toBe(410);
    expect(preview.body.error.message).toMatch(/withdrawn/);
  });

  it('a new invitation to the same address replaces the pending one', async () => {
    const first = await invite('twice.asked@example.org', 'viewer');
    const second = await invite('twice.asked@example.org', 'member');
    expect((await api().get(`/api/invitations/${first.token}`)).status).toBe(410);
    expect((await api().get(`/api/invitations/${second.token}`)).body.role).toBe('member');
  });

  it('only owners invite owners; members are not invited twice; bad bodies write nothing', async () => {
    const asCoach = await api().post(`/api/benches/${f.benchId}/invitations`).set(bearer(f.tokens.coach)).send({ email: 'boss@example.org', role: 'owner' });
    expect(asCoach.status).toBe(403);
    const before = await countAllRows(t);
    const bad = await api().post(`/api/benches/${f.benchId}/invitations`).set(bearer(f.tokens.owner)).send({ email: 'x@', role: 'chief' });
    expect(bad.status).toBe(422);
    expect(Object.keys(bad.body.error.fields).sort()).toEqual(['email', 'role']);
    expect(await countAllRows(t)).toEqual(before);
    const me = await api().get('/api/auth/me').set(bearer(f.tokens.member));
    const dup = await api().post(`/api/benches/${f.benchId}/invitations`).set(bearer(f.tokens.owner)).send({ email: me.body.user.email, role: 'viewer' });
    expect(dup.status).toBe(409);
    expect(dup.body.error.code).toBe(ErrorCode.AlreadyMember);
    expect(await countAllRows(t)).toEqual(before);
  });

  it('an unknown token is 404', async () => {
    expect((await api().get('/api/invitations/not-a-real-token')).status).toBe(404);
  });
});

describe('activity log paging', () => {
  it('pages newest first with a total, and rejects bad paging values with 422', async () => {
    const all = await api().get(`/api/benches/${f.benchId}/activity?limit=200`).set(bearer(f.tokens.owner));
    const total = all.body.total as number;
    expect(all.body.items).toHaveLength(total);
    expect(total).toBeGreaterThan(5);
    const times = (all.body.items as { createdAt: string }[]).map((e) => e.createdAt);
    expect([...times].sort().reverse()).toEqual(times);
    const page = await api().get(`/api/benches/${f.benchId}/activity?limit=2&offset=1`).set(bearer(f.tokens.owner));
    expect(page.body.total).toBe(total);
    expect(page.body.items.map((e: { id: string }) => e.id)).toEqual(all.body.items.slice(1, 3).map((e: { id: string }) => e.id));
    const bad = await api().get(`/api/benches/${f.benchId}/activity?limit=0&offset=-1`).set(bearer(f.tokens.owner));
    expect(bad.status).toBe(422);
    expect(Object.keys(bad.body.error.fields).sort()).toEqual(['limit', 'offset']);
  });
});
