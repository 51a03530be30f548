/**
 * The development outbox holds invitation links, so it is mounted only when asked for
 * (WAVEFIT_DEV_OUTBOX=1), never in production (whatever the case of NODE_ENV), and then only for
 * signed-in site admins. GET /api/health tells the client whether it is mounted (devOutbox).
 */
import request from 'supertest';
import { describe, expect, it } from 'vitest';
import { loadConfig } from '../../server/config';
import { ADMIN, LEAD, bearer, makeTestApp } from './helpers';

describe('configuration', () => {
  it('mounts the outbox only with WAVEFIT_DEV_OUTBOX=1 and never in production', () => {
    const base = { WAVEFIT_SECRET: 'a-secret-of-enough-length-123' };
    expect(loadConfig({ ...base }, { dbPath: ':memory:' }).devOutbox).toBe(false);
    expect(loadConfig({ ...base, WAVEFIT_DEV_OUTBOX: '1' }, { dbPath: ':memory:' }).devOutbox).toBe(true);
    expect(loadConfig({ ...base, WAVEFIT_DEV_OUTBOX: 'yes' }, { dbPath: ':memory:' }).devOutbox).toBe(false);
    for (const NODE_ENV of ['production', 'Production', 'PRODUCTION']) {
      const c = loadConfig({ ...base, NODE_ENV, WAVEFIT_DEV_OUTBOX: '1' }, { dbPath: ':memory:' });
      expect(c.isProduction, NODE_ENV).toBe(true);
      expect(c.devOutbox, NODE_ENV).toBe(false);
    }
  });
});

describe('GET /api/dev/outbox', () => {
  it('is absent by default, and health says so', async () => {
    const t = await makeTestApp();
    try {
      const res = await request(t.app).get('/api/dev/outbox');
      expect(res.status).toBe(404);
      expect((await request(t.app).get('/api/health')).body.devOutbox).toBe(false);
      // Not even an admin finds it.
      expect((await request(t.app).get('/api/dev/outbox').set(bearer(await t.tokenFor(ADMIN)))).status).toBe(404);
    } finally {
      await t.close();
    }
  });

  it('with the flag: 401 without a session, 403 for a member who is not an admin, the messages for an admin', async () => {
    const t = await makeTestApp({ config: { devOutbox: true } });
    try {
      expect((await request(t.app).get('/api/health')).body.devOutbox).toBe(true);
      const lead = await t.tokenFor(LEAD);
      await request(t.app).post(`/api/studies/${t.seed.studyId}/invitations`).set(bearer(lead)).send({ email: 'new.crew@harbourside.example', role: 'reviewer' }).expect(201);
      const anonymous = await request(t.app).get('/api/dev/outbox');
      expect(anonymous.status).toBe(401);
      expect(JSON.stringify(anonymous.body)).not.toMatch(/invite/);
      const member = await request(t.app).get('/api/dev/outbox').set(bearer(lead));
      expect(member.status).toBe(403);
      expect(member.body.error.message).toMatch(/administrator/);
      const admin = await request(t.app).get('/api/dev/outbox').set(bearer(await t.tokenFor(ADMIN)));
      expect(admin.status).toBe(200);
      expect(admin.body.messages.map((m: { to: string }) => m.to)).toContain('new.crew@harbourside.example');
    } finally {
      await t.close();
    }
  });
});
