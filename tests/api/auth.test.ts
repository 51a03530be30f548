/**
 * Sign-in, sessions and their failure cases. Token checks follow RFC 7519 (JSON Web Token) and
 * RFC 7515 (JWS, HS256): a changed payload or another key must break the signature; "exp" in the
 * past means expired. The rate limit is checked with a small limit so the test stays quick.
 */
import jwt from 'jsonwebtoken';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ADMIN, LEAD, REVIEWER, bearer, makeTestApp, type TestApp } from './helpers';

let t: TestApp;
beforeAll(async () => {
  t = await makeTestApp({ config: { loginRateLimit: { max: 3, windowMs: 60_000 } } });
});
afterAll(async () => t.close());

describe('sign-in', () => {
  it('signs in with the right password, sets an httpOnly SameSite=Lax cookie and returns a 12 h token', async () => {
    const res = await request(t.app).post('/api/auth/login').send({ email: ' Lead@Harbourside.example ', password: 'wavefit-demo-1' });
    expect(res.status).toBe(200);
    expect(res.body.user).toMatchObject({ email: LEAD, isAdmin: false });
    const cookie = (res.headers['set-cookie'] as unknown as string[]).find((c) => c.startsWith('wavefit_token='))!;
    expect(cookie).toMatch(/HttpOnly/i);
    expect(cookie).toMatch(/SameSite=Lax/i);
    expect(cookie).toContain(`wavefit_token=${res.body.token}`);
    const hours = (Date.parse(res.body.expiresAt) - Date.now()) / 3_600_000;
    expect(hours).toBeGreaterThan(11.9);
    expect(hours).toBeLessThanOrEqual(12);
    const decoded = jwt.decode(res.body.token, { complete: true })!;
    expect(decoded.header.alg).toBe('HS256');
  });

  it('accepts the session from the cookie and from the bearer header', async () => {
    const agent = request.agent(t.app);
    await agent.post('/api/auth/login').send({ email: REVIEWER, password: 'wavefit-demo-1' }).expect(200);
    const viaCookie = await agent.get('/api/auth/me');
    expect(viaCookie.status).toBe(200);
    expect(viaCookie.body.user.email).toBe(REVIEWER);
    const token = await t.tokenFor(ADMIN);
    const viaHeader = await request(t.app).get('/api/auth/me').set(bearer(token));
    expect(viaHeader.body.user).toMatchObject({ email: ADMIN, isAdmin: true });
  });

  it('gives a wrong password and an unknown e-mail the same answer', async () => {
    const wrong = await request(t.app).post('/api/auth/login').send({ email: 'stats@harbourside.example', password: 'not-the-password' });
    const unknown = await request(t.app).post('/api/auth/login').send({ email: 'nobody@harbourside.example', password: 'not-the-password' });
    expect(wrong.status).toBe(401);
    expect(unknown.status).toBe(401);
    expect(wrong.body).toEqual(unknown.body);
    expect(wrong.body.error.code).toBe('invalid_credentials');
    expect(wrong.headers['set-cookie']).toBeUndefined();
  });

  it('asks for a sign-in when there is no token', async () => {
    const res = await request(t.app).get('/api/studies');
    expect(res.status).toBe(401);
    expect(res.body.error.code).toBe('unauthenticated');
  });

  it('signs out by clearing the cookie', async () => {
    const res = await request(t.app).post('/api/auth/logout');
    expect(res.status).toBe(204);
    const cookie = (res.headers['set-cookie'] as unknown as string[])[0];
    expect(cookie).toMatch(/^wavefit_token=;/);
    expect(cookie).toMatch(/Expires=Thu, 01 Jan 1970/);
  });
});

describe('tokens that must be refused', () => {
  const leadId = () => t.seed.users.findIndex((u) => u.email === LEAD) + 1;

  it('refuses an expired token with token_expired', async () => {
    const past = Math.floor(Date.now() / 1000) - 60;
    const token = jwt.sign({ sub: String(leadId()), iat: past - 3600, exp: past }, t.config.secret, { algorithm: 'HS256' });
    const res = await request(t.app).get('/api/auth/me').set(bearer(token));
    expect(res.status).toBe(401);
    expect(res.body.error.code).toBe('token_expired');
    expect(res.body.error.message).toMatch(/expired/);
  });

  it('refuses a token signed with another secret', async () => {
    const token = jwt.sign({ sub: String(leadId()) }, 'some-other-secret-of-enough-length', { algorithm: 'HS256', expiresIn: 3600 });
    const res = await request(t.app).get('/api/auth/me').set(bearer(token));
    expect(res.status).toBe(401);
    expect(res.body.error.code).toBe('token_invalid');
  });

  it('refuses a real token whose payload was edited to name the admin', async () => {
    const token = await t.tokenFor(REVIEWER);
    const [header, payload, signature] = token.split('.');
    const claims = JSON.parse(Buffer.from(payload, 'base64url').toString('utf8'));
    claims.sub = '1'; // the admin, seeded first
    const edited = [header, Buffer.from(JSON.stringify(claims)).toString('base64url'), signature].join('.');
    const res = await request(t.app).get('/api/auth/me').set(bearer(edited));
    expect(res.status).toBe(401);
    expect(res.body.error.code).toBe('token_invalid');
  });

  it('refuses an unsigned token (alg "none") and rubbish in the cookie', async () => {
    const header = Buffer.from(JSON.stringify({ alg: 'none', typ: 'JWT' })).toString('base64url');
    const payload = Buffer.from(JSON.stringify({ sub: '1', exp: Math.floor(Date.now() / 1000) + 3600 })).toString('base64url');
    const res = await request(t.app).get('/api/auth/me').set(bearer(`${header}.${payload}.`));
    expect(res.status).toBe(401);
    expect(res.body.error.code).toBe('token_invalid');
    const cookie = await request(t.app).get('/api/auth/me').set('Cookie', 'wavefit_token=not-a-token');
    expect(cookie.status).toBe(401);
    expect(cookie.body.error.code).toBe('token_invalid');
  });
});

describe('password change', () => {
  it('refuses a wrong current password and accepts the right one', async () => {
    const t2 = await makeTestApp();
    try {
      const token = await t2.tokenFor(REVIEWER);
      const wrong = await request(t2.app).post('/api/auth/password').set(bearer(token)).send({ currentPassword: 'nope-nope-nope', newPassword: 'a-new-password-42' });
      expect(wrong.status).toBe(400);
      expect(wrong.body.error.details.fields.currentPassword[0]).toMatch(/not right/);
      const short = await request(t2.app).post('/api/auth/password').set(bearer(token)).send({ currentPassword: 'wavefit-demo-1', newPassword: 'short' });
      expect(short.status).toBe(400);
      expect(short.body.error.details.fields.newPassword[0]).toMatch(/at least 10/);
      await request(t2.app).post('/api/auth/password').set(bearer(token)).send({ currentPassword: 'wavefit-demo-1', newPassword: 'a-new-password-42' }).expect(200);
      await request(t2.app).post('/api/auth/login').send({ email: REVIEWER, password: 'wavefit-demo-1' }).expect(401);
      await request(t2.app).post('/api/auth/login').send({ email: REVIEWER, password: 'a-new-password-42' }).expect(200);
    } finally {
      await t2.close();
    }
  });
});

describe('login rate limit (3 failed attempts per IP and e-mail in this test app)', () => {
  it('refuses the next attempt, even with the right password, once the limit is reached', async () => {
    const email = 'stats@harbourside.example';
    const t3 = await makeTestApp({ config: { loginRateLimit: { max: 3, windowMs: 60_000 } } });
    try {
      for (let i = 0; i < 3; i++) {
        const res = await request(t3.app).post('/api/auth/login').send({ email, password: `wrong-${i}-password` });
        expect(res.status).toBe(401);
      }
      const blocked = await request(t3.app).post('/api/auth/login').send({ email, password: 'wavefit-demo-1' });
      expect(blocked.status).toBe(429);
      expect(blocked.body.error.code).toBe('rate_limited');
      expect(blocked.body.error.message).toMatch(/Too many failed sign-in attempts/);
      // Another e-mail from the same address is counted separately.
      await request(t3.app).post('/api/auth/login').send({ email: LEAD, password: 'wavefit-demo-1' }).expect(200);
    } finally {
      await t3.close();
    }
  });

  it('does not count successful sign-ins', async () => {
    for (let i = 0; i < 5; i++) {
      await request(t.app).post('/api/auth/login').send({ email: ADMIN, password: 'wavefit-demo-1' }).expect(200);
    }
  });
});
