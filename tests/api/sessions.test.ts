/**
 * Sessions that end (OWASP Session Management Cheat Sheet, common practice): signing out ends that
 * token on the server, not only the cookie; "sign out everywhere" and a password change end every
 * session of the account; the password change hands this browser a fresh session. An ended token
 * gets 401 session_ended, and nothing stored is lost.
 */
import jwt from 'jsonwebtoken';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO_PASSWORD } from '../../server/demo/seed';
import { LEAD, REVIEWER, STATS, bearer, makeTestApp, type TestApp } from './helpers';

let t: TestApp;
beforeAll(async () => {
  t = await makeTestApp();
});
afterAll(async () => t.close());

const me = (token: string) => request(t.app).get('/api/auth/me').set(bearer(token));

async function expectEnded(token: string) {
  const res = await me(token);
  expect(res.status).toBe(401);
  expect(res.body.error.code).toBe('session_ended');
  expect(res.body.error.message).toMatch(/Sign in again/);
}

describe('sign-out', () => {
  it('ends the token it was sent with, and only that one', async () => {
    const here = await t.tokenFor(STATS);
    const elsewhere = await t.tokenFor(STATS);
    await me(here).expect(200);
    await request(t.app).post('/api/auth/logout').set(bearer(here)).expect(204);
    await expectEnded(here);
    // The same token on another route is refused too.
    const studies = await request(t.app).get('/api/studies').set(bearer(here));
    expect(studies.status).toBe(401);
    expect(studies.body.error.code).toBe('session_ended');
    await me(elsewhere).expect(200);
  });

  it('ends the cookie session of a browser', async () => {
    const agent = request.agent(t.app);
    const login = await agent.post('/api/auth/login').send({ email: REVIEWER, password: DEMO_PASSWORD }).expect(200);
    const token = login.body.token as string;
    await agent.get('/api/auth/me').expect(200);
    const out = await agent.post('/api/auth/logout').expect(204);
    expect(String(out.headers['set-cookie'])).toMatch(/wavefit_token=;/);
    // Someone who copied the cookie's value before sign-out cannot use it.
    await expectEnded(token);
  });

  it('without a session, or with a forged one, still answers 204 and ends nothing', async () => {
    const token = await t.tokenFor(LEAD);
    await request(t.app).post('/api/auth/logout').expect(204);
    await request(t.app).post('/api/auth/logout').set(bearer('not.a.token')).expect(204);
    const forged = jwt.sign({ sub: '1', ep: 0, jti: 'a'.repeat(32) }, 'another-secret-entirely-0123456789', { algorithm: 'HS256', expiresIn: 600 });
    await request(t.app).post('/api/auth/logout').set(bearer(forged)).expect(204);
    await me(token).expect(200);
  });
});

describe('sign out everywhere', () => {
  it('ends every session of the account and no other account', async () => {
    const a = await t.tokenFor(LEAD);
    const b = await t.tokenFor(LEAD);
    const other = await t.tokenFor(REVIEWER);
    await request(t.app).post('/api/auth/logout-everywhere').set(bearer(a)).expect(204);
    await expectEnded(a);
    await expectEnded(b);
    await me(other).expect(200);
    // Signing in again works at once.
    await me(await t.tokenFor(LEAD)).expect(200);
  });

  it('needs a live session', async () => {
    const res = await request(t.app).post('/api/auth/logout-everywhere');
    expect(res.status).toBe(401);
    expect(res.body.error.code).toBe('unauthenticated');
  });
});

describe('password change', () => {
  it('ends the other sessions and gives this one a fresh token', async () => {
    const t2 = await makeTestApp();
    try {
      const login = (password = DEMO_PASSWORD) => t2.tokenFor(REVIEWER, password);
      const here = await login();
      const laptop = await login();
      const res = await request(t2.app).post('/api/auth/password').set(bearer(here)).send({ currentPassword: DEMO_PASSWORD, newPassword: 'a-new-password-42' });
      expect(res.status).toBe(200);
      expect(res.body.user.email).toBe(REVIEWER);
      expect(String(res.headers['set-cookie'])).toMatch(/wavefit_token=[^;]+;.*HttpOnly/i);
      const fresh = res.body.token as string;
      expect(fresh).not.toBe(here);
      for (const old of [here, laptop]) {
        const r = await request(t2.app).get('/api/auth/me').set(bearer(old));
        expect(r.status).toBe(401);
        expect(r.body.error.code).toBe('session_ended');
      }
      await request(t2.app).get('/api/auth/me').set(bearer(fresh)).expect(200);
      await login('a-new-password-42');
    } finally {
      await t2.close();
    }
  });

  it('a wrong current password ends nothing', async () => {
    const token = await t.tokenFor(STATS);
    const res = await request(t.app).post('/api/auth/password').set(bearer(token)).send({ currentPassword: 'not-the-password', newPassword: 'a-new-password-42' });
    expect(res.status).toBe(400);
    await me(token).expect(200);
  });
});

describe('tokens', () => {
  it('a genuine token from before sessions could end (no epoch, no id) counts as ended', async () => {
    const sub = (jwt.decode(await t.tokenFor(STATS)) as { sub: string }).sub;
    const old = jwt.sign({ sub }, t.config.secret, { algorithm: 'HS256', expiresIn: 600 });
    await expectEnded(old);
  });

  it('a token with an old epoch counts as ended, a forged one as invalid', async () => {
    const token = await t.tokenFor(STATS);
    const payload = jwt.decode(token) as Record<string, unknown>;
    const stale = jwt.sign({ ...payload, ep: (payload.ep as number) - 1 }, t.config.secret, { algorithm: 'HS256' });
    await expectEnded(stale);
    const forged = jwt.sign(payload, 'another-secret-entirely-0123456789', { algorithm: 'HS256' });
    const res = await me(forged);
    expect(res.status).toBe(401);
    expect(res.body.error.code).toBe('token_invalid');
  });
});
