import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ErrorCode, SIGN_IN_FAILED_MESSAGE } from '../../../shared/api/errors';
import { bearer, countRows, createTestApp, signUp, TEST_PASSWORD, type TestApp } from '../../testing/test-app';

let t: TestApp;
beforeAll(async () => {
  t = await createTestApp();
});
afterAll(async () => t.close());

describe('sign-up', () => {
  it('creates the account, returns a working token, and makes only the first account admin', async () => {
    const first = await signUp(t, 'first@example.org', 'First');
    const second = await signUp(t, 'Second@Example.org ', 'Second');
    expect(first.user.isAdmin).toBe(true);
    expect(second.user.isAdmin).toBe(false);
    expect(second.user.email).toBe('second@example.org');
    const me = await request(t.app).get('/api/auth/me').set(bearer(second.token));
    expect(me.status).toBe(200);
    expect(me.body.user).toEqual(second.user);
  });

  it('never returns the password hash', async () => {
    const res = await request(t.app).post('/api/auth/signin').send({ email: 'first@example.org', password: TEST_PASSWORD });
    expect(JSON.stringify(res.body)).not.toMatch(/passwordHash|\$2[aby]\$/);
  });

  it('refuses a taken e-mail with 409 and writes nothing', async () => {
    const before = await countRows(t, 'users');
    const res = await request(t.app)
      .post('/api/auth/signup')
      .send({ email: 'FIRST@example.org', password: TEST_PASSWORD, displayName: 'Again' });
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe(ErrorCode.EmailTaken);
    expect(await countRows(t, 'users')).toBe(before);
  });

  it('refuses a bad body with 422, one message per field, and writes nothing', async () => {
    const before = await countRows(t, 'users');
    const res = await request(t.app).post('/api/auth/signup').send({ email: 'not-an-address', password: 'short', displayName: '  ' });
    expect(res.status).toBe(422);
    expect(res.body.error.code).toBe(ErrorCode.ValidationFailed);
    expect(Object.keys(res.body.error.fields).sort()).toEqual(['displayName', 'email', 'password']);
    expect(res.body.error.fields.password).toMatch(/at least 8/);
    expect(await countRows(t, 'users')).toBe(before);
  });

  it('refuses passwords over the 72 bytes bcrypt reads (counted in UTF-8 bytes, not characters)', async () => {
    // 40 × "é" is 40 characters but 80 bytes in UTF-8 (Unicode: U+00E9 encodes as 2 bytes).
    const res = await request(t.app)
      .post('/api/auth/signup')
      .send({ email: 'long@example.org', password: 'é'.repeat(40), displayName: 'Long' });
    expect(res.status).toBe(422);
    expect(res.body.error.fields.password).toMatch(/72 bytes/);
  });

  it('answers 422 (not 500) when no JSON body is sent at all', async () => {
    const res = await request(t.app).post('/api/auth/signup');
    expect(res.status).toBe(422);
    expect(res.body.error.fields.email).toBeTruthy();
  });
});

describe('sign-in', () => {
  it('signs in with the right password', async () => {
    const res = await request(t.app).post('/api/auth/signin').send({ email: 'second@example.org', password: TEST_PASSWORD });
    expect(res.status).toBe(200);
    expect(res.body.user.email).toBe('second@example.org');
    expect(typeof res.body.token).toBe('string');
  });

  it('gives the same 401 answer for an unknown e-mail and for a wrong password', async () => {
    const unknown = await request(t.app).post('/api/auth/signin').send({ email: 'nobody@example.org', password: TEST_PASSWORD });
    const wrong = await request(t.app).post('/api/auth/signin').send({ email: 'second@example.org', password: 'not the password' });
    expect(unknown.status).toBe(401);
    expect(wrong.status).toBe(401);
    expect(unknown.body).toEqual(wrong.body);
    expect(unknown.body.error).toEqual({ code: ErrorCode.BadCredentials, message: SIGN_IN_FAILED_MESSAGE });
  });

  it('refuses missing, malformed and forged tokens', async () => {
    const none = await request(t.app).get('/api/auth/me');
    const junk = await request(t.app).get('/api/auth/me').set(bearer('abc.def.ghi'));
    const auth = await signUp(t, 'forger@example.org');
    const [head, , sig] = auth.token.split('.');
    const body = Buffer.from(JSON.stringify({ sub: auth.user.id, tv: 0, isAdmin: true })).toString('base64url');
    const forged = await request(t.app).get('/api/auth/me').set(bearer(`${head}.${body}.${sig}`));
    for (const res of [none, junk, forged]) {
      expect(res.status).toBe(401);
      expect(res.body.error.code).toBe(ErrorCode.NotSignedIn);
    }
  });

  it('lets tokens expire after JWT_TTL_SECONDS (7 days by default)', async () => {
    const auth = await signUp(t, 'expiring@example.org');
    t.clock.advance(7 * 24 * 3600 * 1000 - 60_000);
    expect((await request(t.app).get('/api/auth/me').set(bearer(auth.token))).status).toBe(200);
    t.clock.advance(2 * 60_000);
    expect((await request(t.app).get('/api/auth/me').set(bearer(auth.token))).status).toBe(401);
  });
});

describe('sign-out and password change', () => {
  it('sign-out invalidates every token of the user, and only of that user', async () => {
    const a1 = await signUp(t, 'signout@example.org');
    const a2 = (await request(t.app).post('/api/auth/signin').send({ email: 'signout@example.org', password: TEST_PASSWORD })).body;
    const other = await signUp(t, 'bystander@example.org');
    expect((await request(t.app).post('/api/auth/signout').set(bearer(a1.token))).status).toBe(204);
    expect((await request(t.app).get('/api/auth/me').set(bearer(a1.token))).status).toBe(401);
    expect((await request(t.app).get('/api/auth/me').set(bearer(a2.token))).status).toBe(401);
    expect((await request(t.app).get('/api/auth/me').set(bearer(other.token))).status).toBe(200);
    const again = await request(t.app).post('/api/auth/signin').send({ email: 'signout@example.org', password: TEST_PASSWORD });
    expect((await request(t.app).get('/api/auth/me').set(bearer(again.body.token))).status).toBe(200);
  });

  it('changes the password: new token works, old token and old password stop working', async () => {
    const auth = await signUp(t, 'changer@example.org');
    const res = await request(t.app)
      .post('/api/auth/password')
      .set(bearer(auth.token))
      .send({ currentPassword: TEST_PASSWORD, newPassword: 'a brand new secret' });
    expect(res.status).toBe(200);
    expect((await request(t.app).get('/api/auth/me').set(bearer(auth.token))).status).toBe(401);
    expect((await request(t.app).get('/api/auth/me').set(bearer(res.body.token))).status).toBe(200);
    const oldPw = await request(t.app).post('/api/auth/signin').send({ email: 'changer@example.org', password: TEST_PASSWORD });
    const newPw = await request(t.app).post('/api/auth/signin').send({ email: 'changer@example.org', password: 'a brand new secret' });
    expect(oldPw.status).toBe(401);
    expect(newPw.status).toBe(200);
  });

  it('refuses a wrong current password with 422 on that field (not 401, which would sign the user out)', async () => {
    const auth = await signUp(t, 'careful@example.org');
    const res = await request(t.app)
      .post('/api/auth/password')
      .set(bearer(auth.token))
      .send({ currentPassword: 'wrong wrong', newPassword: 'another secret' });
    expect(res.status).toBe(422);
    expect(res.body.error.fields.currentPassword).toMatch(/current password is wrong/i);
    expect((await request(t.app).get('/api/auth/me').set(bearer(auth.token))).status).toBe(200);
  });
});

describe('simultaneous sign-ups', () => {
  it('lets exactly one of two sign-ups with the same address through; the other gets 409', async () => {
    const body = { email: 'racer@example.org', password: TEST_PASSWORD, displayName: 'Racer' };
    const [a, b] = await Promise.all([
      request(t.app).post('/api/auth/signup').send(body),
      request(t.app).post('/api/auth/signup').send(body),
    ]);
    expect([a.status, b.status].sort()).toEqual([201, 409]);
    const rows: { n: number }[] = await t.orm.em.fork().getConnection().execute("select count(*) as n from users where email = 'racer@example.org'");
    expect(Number(rows[0]!.n)).toBe(1);
  });
});
