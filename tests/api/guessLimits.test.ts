/**
 * Limits on password guessing per account and per network address (OWASP Authentication Cheat
 * Sheet, "Protect against automated attacks", common practice): spraying one password over many
 * accounts from one address, guessing one account from many addresses, wrong current passwords on
 * a password change, and wrong passwords of an existing account on an invitation. Each app here
 * trusts X-Forwarded-For so one test can speak from several addresses.
 */
import request from 'supertest';
import { describe, expect, it } from 'vitest';
import { DEMO_PASSWORD } from '../../server/demo/seed';
import { hashPassword, verifyPassword } from '../../server/auth/passwords';
import { UserEntity } from '../../server/auth/entities';
import { ADMIN, LEAD, REVIEWER, STATS, bearer, makeTestApp } from './helpers';

const LIMITS = { perAccount: 4, perAddress: 6, windowMs: 60_000 };
const app = () => makeTestApp({ config: { trustProxy: true, guessLimits: LIMITS, loginRateLimit: { max: 100, windowMs: 60_000 } } });
const from = (address: string) => ({ 'X-Forwarded-For': address });

describe('sign-in', () => {
  it('stops spraying many accounts from one address', async () => {
    const t = await app();
    try {
      // One wrong password on each of many (mostly unknown) accounts: no single account is near its limit.
      for (let i = 0; i < LIMITS.perAddress; i++) {
        const res = await request(t.app).post('/api/auth/login').set(from('203.0.113.7')).send({ email: `crew${i}@harbourside.example`, password: 'Harbour2026!' });
        expect(res.status).toBe(401);
      }
      const blocked = await request(t.app).post('/api/auth/login').set(from('203.0.113.7')).send({ email: LEAD, password: DEMO_PASSWORD });
      expect(blocked.status).toBe(429);
      expect(blocked.body.error).toMatchObject({ code: 'rate_limited' });
      expect(blocked.body.error.message).toMatch(/network address/);
      // Another address is not affected, and neither is the account.
      await request(t.app).post('/api/auth/login').set(from('198.51.100.2')).send({ email: LEAD, password: DEMO_PASSWORD }).expect(200);
    } finally {
      await t.close();
    }
  });

  it('stops guessing one account from many addresses', async () => {
    const t = await app();
    try {
      for (let i = 0; i < LIMITS.perAccount; i++) {
        const res = await request(t.app).post('/api/auth/login').set(from(`192.0.2.${i + 1}`)).send({ email: STATS, password: `guess-number-${i}` });
        expect(res.status).toBe(401);
      }
      const blocked = await request(t.app).post('/api/auth/login').set(from('192.0.2.200')).send({ email: ' Stats@Harbourside.example', password: DEMO_PASSWORD });
      expect(blocked.status).toBe(429);
      expect(blocked.body.error.message).toMatch(/this account/);
      // Other accounts from the same addresses still sign in.
      await request(t.app).post('/api/auth/login').set(from('192.0.2.1')).send({ email: REVIEWER, password: DEMO_PASSWORD }).expect(200);
    } finally {
      await t.close();
    }
  });

  it('does not count right passwords or malformed requests', async () => {
    const t = await app();
    try {
      for (let i = 0; i < LIMITS.perAddress + 2; i++) {
        await request(t.app).post('/api/auth/login').set(from('203.0.113.9')).send({ email: ADMIN, password: DEMO_PASSWORD }).expect(200);
        await request(t.app).post('/api/auth/login').set(from('203.0.113.9')).send({ email: 'not-an-email' }).expect(400);
      }
    } finally {
      await t.close();
    }
  });
});

describe('password change', () => {
  it('limits wrong current passwords per account, and they count with sign-in guesses', async () => {
    const t = await app();
    try {
      const token = await t.tokenFor(REVIEWER);
      const change = (currentPassword: string, address: string) =>
        request(t.app).post('/api/auth/password').set(bearer(token)).set(from(address)).send({ currentPassword, newPassword: 'a-new-password-42' });
      await request(t.app).post('/api/auth/login').set(from('192.0.2.50')).send({ email: REVIEWER, password: 'wrong-one-here' }).expect(401);
      for (let i = 0; i < LIMITS.perAccount - 1; i++) expect((await change(`wrong-current-${i}`, `192.0.2.${60 + i}`)).status).toBe(400);
      const blocked = await change(DEMO_PASSWORD, '192.0.2.99');
      expect(blocked.status).toBe(429);
      expect(blocked.body.error.message).toMatch(/this account/);
      // The password was not changed.
      const user = await t.dataSource.getRepository(UserEntity).findOneByOrFail({ email: REVIEWER });
      expect(await verifyPassword(user.passwordHash, DEMO_PASSWORD)).toBe(true);
    } finally {
      await t.close();
    }
  });

  it('limits wrong current passwords per address over several accounts', async () => {
    const t = await app();
    try {
      const tokens = await Promise.all([LEAD, STATS, REVIEWER, ADMIN].map((e) => t.tokenFor(e)));
      let n = 0;
      for (const token of tokens) {
        for (let i = 0; i < 2 && n < LIMITS.perAddress; i++, n++) {
          const res = await request(t.app).post('/api/auth/password').set(bearer(token)).set(from('203.0.113.20')).send({ currentPassword: `wrong-${n}-pass`, newPassword: 'a-new-password-42' });
          expect(res.status).toBe(400);
        }
      }
      const blocked = await request(t.app).post('/api/auth/password').set(bearer(tokens[3])).set(from('203.0.113.20')).send({ currentPassword: DEMO_PASSWORD, newPassword: 'a-new-password-42' });
      expect(blocked.status).toBe(429);
      expect(blocked.body.error.message).toMatch(/network address/);
    } finally {
      await t.close();
    }
  });
});

describe('invitation accept for an existing account', () => {
  it('limits wrong passwords per account', async () => {
    const t = await app();
    try {
      // An existing user with no membership in the study is invited.
      const email = 'deckhand@harbourside.example';
      await t.dataSource.getRepository(UserEntity).save({ email, name: 'Deck Hand', passwordHash: await hashPassword('deckhand-pass-1', t.config.passwordHash), isAdmin: false });
      const lead = await t.tokenFor(LEAD);
      await request(t.app).post(`/api/studies/${t.seed.studyId}/invitations`).set(bearer(lead)).send({ email, role: 'reviewer' }).expect(201);
      const token = /\/invite\/([A-Za-z0-9_-]+)/.exec(t.mailer.messages().at(-1)!.text)![1];
      const accept = (password: string, address: string) => request(t.app).post(`/api/invitations/${token}/accept`).set(from(address)).send({ name: 'Deck Hand', password });
      for (let i = 0; i < LIMITS.perAccount; i++) expect((await accept(`wrong-guess-${i}-x`, `192.0.2.${i + 1}`)).status).toBe(401);
      const blocked = await accept('deckhand-pass-1', '192.0.2.100');
      expect(blocked.status).toBe(429);
      expect(blocked.body.error.message).toMatch(/this account/);
      expect(await t.counts('memberships')).toEqual({ memberships: 3 });
    } finally {
      await t.close();
    }
  });

  it('limits wrong passwords per address', async () => {
    const t = await app();
    try {
      const email = 'deckhand@harbourside.example';
      await t.dataSource.getRepository(UserEntity).save({ email, name: 'Deck Hand', passwordHash: await hashPassword('deckhand-pass-1', t.config.passwordHash), isAdmin: false });
      const lead = await t.tokenFor(LEAD);
      await request(t.app).post(`/api/studies/${t.seed.studyId}/invitations`).set(bearer(lead)).send({ email, role: 'reviewer' }).expect(201);
      const token = /\/invite\/([A-Za-z0-9_-]+)/.exec(t.mailer.messages().at(-1)!.text)![1];
      // Wrong sign-ins on other accounts from this address, then wrong invitation passwords: one address counter.
      for (let i = 0; i < LIMITS.perAddress - 2; i++) {
        await request(t.app).post('/api/auth/login').set(from('203.0.113.30')).send({ email: `crew${i}@harbourside.example`, password: 'Harbour2026!' }).expect(401);
      }
      for (let i = 0; i < 2; i++) {
        expect((await request(t.app).post(`/api/invitations/${token}/accept`).set(from('203.0.113.30')).send({ name: 'Deck Hand', password: `wrong-guess-${i}-x` })).status).toBe(401);
      }
      const blocked = await request(t.app).post(`/api/invitations/${token}/accept`).set(from('203.0.113.30')).send({ name: 'Deck Hand', password: 'deckhand-pass-1' });
      expect(blocked.status).toBe(429);
      expect(blocked.body.error.message).toMatch(/network address/);
      await request(t.app).post(`/api/invitations/${token}/accept`).set(from('198.51.100.40')).send({ name: 'Deck Hand', password: 'deckhand-pass-1' }).expect(200);
    } finally {
      await t.close();
    }
  });
});
