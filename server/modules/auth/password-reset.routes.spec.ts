import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ErrorCode } from '../../../shared/api/errors';
import { bearer, countRows, createTestApp, signUp, TEST_PASSWORD, type TestApp } from '../../testing/test-app';

let t: TestApp;
beforeAll(async () => {
  t = await createTestApp();
  await signUp(t, 'admin@example.org', 'Admin');
});
afterAll(async () => t.close());

/** Asks for a reset link and returns the token from the captured e-mail. */
async function requestResetToken(email: string): Promise<string> {
  const sentBefore = t.mailbox.list().length;
  const res = await request(t.app).post('/api/auth/reset/request').send({ email });
  expect(res.status).toBe(202);
  const mail = await t.mailbox.waitFor((m) => m.to === email && t.mailbox.list().length > sentBefore);
  const match = /\/reset-password\/([A-Za-z0-9_-]+)/.exec(mail.text);
  expect(match).not.toBeNull();
  expect(mail.html).toContain(`http://workbench.test/reset-password/${match![1]}`);
  return match![1]!;
}

describe('password reset', () => {
  it('answers 202 for an unknown address too, and sends nothing', async () => {
    const before = t.mailbox.list().length;
    const tokensBefore = await countRows(t, 'password_reset_tokens');
    const res = await request(t.app).post('/api/auth/reset/request').send({ email: 'nobody@example.org' });
    const known = await request(t.app).post('/api/auth/reset/request').send({ email: 'admin@example.org' });
    expect(res.status).toBe(202);
    expect(res.body).toEqual(known.body);
    await t.mailbox.waitFor((m) => m.to === 'admin@example.org');
    expect(t.mailbox.list().filter((m) => m.to === 'nobody@example.org')).toHaveLength(0);
    expect(t.mailbox.list().length).toBe(before + 1);
    expect(await countRows(t, 'password_reset_tokens')).toBe(tokensBefore + 1);
  });

  it('stores only a hash of the token', async () => {
    await signUp(t, 'hashcheck@example.org');
    const token = await requestResetToken('hashcheck@example.org');
    const rows: { token_hash: string }[] = await t.orm.em.fork().getConnection().execute('select token_hash from password_reset_tokens');
    expect(rows.some((r) => r.token_hash === token)).toBe(false);
    expect(rows.every((r) => /^[0-9a-f]{64}$/.test(r.token_hash))).toBe(true);
  });

  it('sets a new password through the link once; old sessions end; the link does not work twice', async () => {
    const auth = await signUp(t, 'forgetful@example.org');
    const token = await requestResetToken('forgetful@example.org');
    const ok = await request(t.app).post('/api/auth/reset/confirm').send({ token, newPassword: 'remembered at last' });
    expect(ok.status).toBe(204);
    expect((await request(t.app).get('/api/auth/me').set(bearer(auth.token))).status).toBe(401);
    const signIn = await request(t.app).post('/api/auth/signin').send({ email: 'forgetful@example.org', password: 'remembered at last' });
    expect(signIn.status).toBe(200);
    const again = await request(t.app).post('/api/auth/reset/confirm').send({ token, newPassword: 'a third password' });
    expect(again.status).toBe(410);
    expect(again.body.error.code).toBe(ErrorCode.ResetLinkUnusable);
    const stillSecond = await request(t.app).post('/api/auth/signin').send({ email: 'forgetful@example.org', password: 'remembered at last' });
    expect(stillSecond.status).toBe(200);
  });

  it('expires the link after one hour', async () => {
    await signUp(t, 'slow@example.org');
    const early = await requestResetToken('slow@example.org');
    t.clock.advance(59 * 60 * 1000);
    expect((await request(t.app).post('/api/auth/reset/confirm').send({ token: early, newPassword: 'in time, just' })).status).toBe(204);
    const late = await requestResetToken('slow@example.org');
    t.clock.advance(60 * 60 * 1000 + 1000);
    const res = await request(t.app).post('/api/auth/reset/confirm').send({ token: late, newPassword: 'too late now' });
    expect(res.status).toBe(410);
    const signIn = await request(t.app).post('/api/auth/signin').send({ email: 'slow@example.org', password: 'in time, just' });
    expect(signIn.status).toBe(200);
  });

  it('a newer link replaces an older one', async () => {
    await signUp(t, 'twice@example.org');
    const first = await requestResetToken('twice@example.org');
    const second = await requestResetToken('twice@example.org');
    expect(first).not.toBe(second);
    expect((await request(t.app).post('/api/auth/reset/confirm').send({ token: first, newPassword: 'from the old link' })).status).toBe(410);
    expect((await request(t.app).post('/api/auth/reset/confirm').send({ token: second, newPassword: 'from the new link' })).status).toBe(204);
  });

  it('refuses an unknown token with 410 and a weak new password with 422, changing nothing', async () => {
    await signUp(t, 'steady@example.org');
    const token = await requestResetToken('steady@example.org');
    const weak = await request(t.app).post('/api/auth/reset/confirm').send({ token, newPassword: 'short' });
    expect(weak.status).toBe(422);
    expect(weak.body.error.fields.newPassword).toBeTruthy();
    const unknown = await request(t.app).post('/api/auth/reset/confirm').send({ token: 'x'.repeat(43), newPassword: 'long enough now' });
    expect(unknown.status).toBe(410);
    const signIn = await request(t.app).post('/api/auth/signin').send({ email: 'steady@example.org', password: TEST_PASSWORD });
    expect(signIn.status).toBe(200);
    expect((await request(t.app).post('/api/auth/reset/confirm').send({ token, newPassword: 'long enough now' })).status).toBe(204);
  });
});
