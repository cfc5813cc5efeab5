// Limits where abuse is cheap: password change and account deletion per person, invitations per sender,
// per bench and per address; reset requests answer at once and alike for known and unknown addresses.
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ErrorCode } from '../../../shared/api/errors';
import { bearer, countRows, createBenchFixture, createTestApp, TEST_PASSWORD, type BenchFixture, type TestApp } from '../../testing/test-app';

let t: TestApp;
let f: BenchFixture;

beforeAll(async () => {
  t = await createTestApp({ AUTH_RATE_LIMIT: '10000', INVITE_RATE_LIMIT: '4', INVITE_BENCH_RATE_LIMIT: '6', INVITE_ADDRESS_RATE_LIMIT: '2' });
  f = await createBenchFixture(t);
});
afterAll(async () => t.close());

const invite = (token: string, email: string) =>
  request(t.app).post(`/api/benches/${f.benchId}/invitations`).set(bearer(token)).send({ email, role: 'viewer' });

describe('invitation limits', () => {
  it('refuses a third invitation to one address with 429 and sends no mail for it', async () => {
    expect((await invite(f.tokens.owner, 'same@example.org')).status).toBe(201);
    expect((await invite(f.tokens.owner, 'same@example.org')).status).toBe(201);
    const mailsBefore = t.mailbox.list().length;
    const rowsBefore = await countRows(t, 'invitations');
    const third = await invite(f.tokens.owner, 'same@example.org');
    expect(third.status).toBe(429);
    expect(third.body.error.code).toBe(ErrorCode.RateLimited);
    expect(third.body.error.message).toMatch(/Too many invitations to this address/);
    expect(await countRows(t, 'invitations')).toBe(rowsBefore);
    await new Promise((r) => setTimeout(r, 50));
    expect(t.mailbox.list().length).toBe(mailsBefore);
  });

  it('limits one sender (3 attempts so far, refused ones count too: the 4th passes, the 5th is refused)', async () => {
    expect((await invite(f.tokens.owner, 'p1@example.org')).status).toBe(201);
    const res = await invite(f.tokens.owner, 'p2@example.org');
    expect(res.status).toBe(429);
    expect(res.body.error.message).toMatch(/invitations sent by you/);
  });

  it('limits the bench as a whole (another coach hits the bench limit of 6)', async () => {
    expect((await invite(f.tokens.coach, 'c1@example.org')).status).toBe(201);
    expect((await invite(f.tokens.coach, 'c2@example.org')).status).toBe(201);
    const res = await invite(f.tokens.coach, 'c3@example.org');
    expect(res.status).toBe(429);
    expect(res.body.error.message).toMatch(/invitations from this bench/);
  });
});

describe('password change and account deletion limits', () => {
  it('counts wrong current passwords per person and answers 429 after the limit', async () => {
    const t2 = await createTestApp({ AUTH_RATE_LIMIT: '3' });
    try {
      const signup = await request(t2.app).post('/api/auth/signup').send({ email: 'limit@example.org', password: TEST_PASSWORD, displayName: 'Limit' });
      const token = signup.body.token as string;
      const statuses: number[] = [];
      for (let i = 0; i < 4; i++) {
        const res = await request(t2.app).post('/api/auth/password').set(bearer(token)).send({ currentPassword: `wrong ${i}`, newPassword: 'a much longer passphrase 7' });
        statuses.push(res.status);
      }
      expect(statuses).toEqual([422, 422, 422, 429]);
      const del = [];
      for (let i = 0; i < 4; i++) {
        del.push((await request(t2.app).delete('/api/auth/account').set(bearer(token)).send({ password: 'wrong', confirmEmail: 'limit@example.org' })).status);
      }
      expect(del).toEqual([422, 422, 422, 429]);
    } finally {
      await t2.close();
    }
  });
});

describe('reset requests', () => {
  it('answers the same 202 for a known and an unknown address; the mail follows for the known one', async () => {
    const email = (await request(t.app).get('/api/auth/me').set(bearer(f.tokens.member))).body.user.email as string;
    const known = await request(t.app).post('/api/auth/reset/request').send({ email });
    const unknown = await request(t.app).post('/api/auth/reset/request').send({ email: 'nobody.here@example.org' });
    expect(known.status).toBe(202);
    expect(unknown.status).toBe(202);
    expect(known.body).toEqual(unknown.body);
    const mail = await t.mailbox.waitFor((m) => m.to === email && m.text.includes('/reset'));
    expect(mail.to).toBe(email);
    await new Promise((r) => setTimeout(r, 50));
    expect(t.mailbox.list().some((m) => m.to === 'nobody.here@example.org')).toBe(false);
  });
});
