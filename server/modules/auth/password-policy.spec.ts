// New passwords (OWASP ASVS 4.0 level 1, 2.1.7: refuse common/breached passwords; zxcvbn scores from the
// @zxcvbn-ts reference library), tokens without an expiry, and who becomes the first admin in production.
import jwt from 'jsonwebtoken';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { bearer, countRows, createTestApp, TEST_PASSWORD, type TestApp } from '../../testing/test-app';
import { AdminSetup } from './admin-setup';

let t: TestApp;
beforeAll(async () => {
  t = await createTestApp();
});
afterAll(async () => t.close());

const signup = (app: TestApp, email: string, password: string, extra: Record<string, string> = {}) =>
  request(app.app).post('/api/auth/signup').send({ email, password, displayName: 'Pat Example', ...extra });

describe('weak passwords', () => {
  it.each([
    ['12345678', /most common passwords|too easy/],
    ['password', /most common passwords|too easy/],
    ['        ', /too easy to guess/],
    ['qwertyuiop', /most common passwords|too easy/],
  ])('refuses %j with 422 on the password field and stores nobody', async (password, message) => {
    const before = await countRows(t, 'users');
    const res = await signup(t, 'weak@example.org', password);
    expect(res.status).toBe(422);
    expect(res.body.error.fields.password).toMatch(message);
    expect(await countRows(t, 'users')).toBe(before);
  });

  it('refuses the e-mail address itself (any letter case)', async () => {
    const res = await signup(t, 'pat.example@example.org', 'Pat.Example@example.org');
    expect(res.status).toBe(422);
    expect(res.body.error.fields.password).toMatch(/e-mail address/);
  });

  it('accepts a phrase of unrelated words', async () => {
    expect((await signup(t, 'strong@example.org', TEST_PASSWORD)).status).toBe(201);
  });

  it('applies to password changes too', async () => {
    const { token } = (await signup(t, 'changer2@example.org', TEST_PASSWORD)).body as { token: string };
    const res = await request(t.app).post('/api/auth/password').set(bearer(token)).send({ currentPassword: TEST_PASSWORD, newPassword: 'password1' });
    expect(res.status).toBe(422);
    expect(res.body.error.fields.newPassword).toBeDefined();
  });
});

describe('tokens', () => {
  it('refuses a validly signed token without exp', async () => {
    const { token, user } = (await signup(t, 'noexp@example.org', TEST_PASSWORD)).body as { token: string; user: { id: string } };
    expect((await request(t.app).get('/api/auth/me').set(bearer(token))).status).toBe(200);
    const forever = jwt.sign({ tv: 0 }, t.config.jwtSecret, { algorithm: 'HS256', subject: user.id });
    expect(jwt.decode(forever)).not.toHaveProperty('exp');
    const res = await request(t.app).get('/api/auth/me').set(bearer(forever));
    expect(res.status).toBe(401);
  });
});

describe('the first admin in production', () => {
  const production = { NODE_ENV: 'production', BCRYPT_COST: '10', SEED_DEMO: 'false' };

  it('does not make the first account admin without the setup code; the code works once', async () => {
    const setup = new AdminSetup({ devMode: false, adminEmail: '' });
    const code = (setup as unknown as { code: string }).code;
    const p = await createTestApp(production);
    try {
      // createTestApp builds its own AdminSetup: reach the same one through a fresh app with ours.
      const { createApp } = await import('../../app');
      const { mailboxMailer } = await import('../mail/mailer');
      const app = createApp(p.config, { orm: p.orm, mailer: mailboxMailer(p.mailbox, p.config.mailFrom), adminSetup: setup });
      const first = await request(app).post('/api/auth/signup').send({ email: 'first@example.org', password: TEST_PASSWORD, displayName: 'First' });
      expect(first.status).toBe(201);
      expect(first.body.user.isAdmin).toBe(false);
      const wrong = await request(app).post('/api/auth/signup').send({ email: 'second@example.org', password: TEST_PASSWORD, displayName: 'Second', setupCode: 'not-the-code' });
      expect(wrong.body.user.isAdmin).toBe(false);
      const right = await request(app).post('/api/auth/signup').send({ email: 'third@example.org', password: TEST_PASSWORD, displayName: 'Third', setupCode: code });
      expect(right.body.user.isAdmin).toBe(true);
      const again = await request(app).post('/api/auth/signup').send({ email: 'fourth@example.org', password: TEST_PASSWORD, displayName: 'Fourth', setupCode: code });
      expect(again.body.user.isAdmin).toBe(false);
    } finally {
      await p.close();
    }
  });

  it('makes the ADMIN_EMAIL account admin', async () => {
    const p = await createTestApp({ ...production, ADMIN_EMAIL: 'Boss@Example.org' });
    try {
      const other = await signup(p, 'other@example.org', TEST_PASSWORD);
      expect(other.body.user.isAdmin).toBe(false);
      const boss = await signup(p, 'boss@example.org', TEST_PASSWORD);
      expect(boss.body.user.isAdmin).toBe(true);
    } finally {
      await p.close();
    }
  });
});
