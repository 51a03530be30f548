/**
 * Security headers on the API and the web app (helmet; OWASP HTTP Headers Cheat Sheet, common
 * practice), Secure cookies in production, and bounds on what people type: hand-entered batch
 * parameters get the same bounds as fit parameters (1e308 is not a rate), and names and labels
 * carry no NUL or other control characters. Refused input stores nothing.
 */
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { loadConfig } from '../../server/config';
import { DEMO_PASSWORD } from '../../server/demo/seed';
import { stopJobQueue } from '../../server/jobs';
import { serveWebApp } from '../../server/main';
import { LEAD, STATS, bearer, makeTestApp, type TestApp } from './helpers';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';

describe('security headers', () => {
  let t: TestApp;
  let dist: string;
  beforeAll(async () => {
    t = await makeTestApp({ config: { trustProxy: true } });
    dist = mkdtempSync(join(tmpdir(), 'wavefit-dist-'));
    writeFileSync(join(dist, 'index.html'), '<!doctype html><title>Wavefit</title>');
    serveWebApp(t.app, dist);
  });
  afterAll(async () => {
    await t.close();
    rmSync(dist, { recursive: true, force: true });
  });

  it.each(['/api/health', '/', '/studies/1'])('%s carries the CSP, no-referrer, nosniff and no framing', async (path) => {
    const res = await request(t.app).get(path);
    expect(res.status).toBe(200);
    const csp = res.headers['content-security-policy'];
    expect(csp).toMatch(/default-src 'self'/);
    expect(csp).toMatch(/frame-ancestors 'none'/);
    expect(csp).toMatch(/object-src 'none'/);
    expect(csp).not.toMatch(/script-src[^;]*unsafe/);
    expect(res.headers['referrer-policy']).toBe('no-referrer');
    expect(res.headers['x-content-type-options']).toBe('nosniff');
    expect(res.headers['x-frame-options']).toBe('SAMEORIGIN');
    expect(res.headers['x-powered-by']).toBeUndefined();
  });

  it('sends HSTS only over HTTPS', async () => {
    expect((await request(t.app).get('/api/health')).headers['strict-transport-security']).toBeUndefined();
    const https = await request(t.app).get('/api/health').set('X-Forwarded-Proto', 'https');
    expect(https.headers['strict-transport-security']).toMatch(/max-age=31536000; includeSubDomains/);
  });
});

describe('cookies', () => {
  const env = { WAVEFIT_SECRET: 'a-secret-of-enough-length-123' };
  it('are Secure in production and with an https address, unless SECURE_COOKIES=false', () => {
    expect(loadConfig({ ...env }, { dbPath: ':memory:' }).secureCookies).toBe(false);
    expect(loadConfig({ ...env, NODE_ENV: 'production' }, { dbPath: ':memory:' }).secureCookies).toBe(true);
    expect(loadConfig({ ...env, PUBLIC_URL: 'https://wavefit.example' }, { dbPath: ':memory:' }).secureCookies).toBe(true);
    expect(loadConfig({ ...env, NODE_ENV: 'production', SECURE_COOKIES: 'false' }, { dbPath: ':memory:' }).secureCookies).toBe(false);
  });

  it('the production session cookie has the Secure flag', async () => {
    const prod = await makeTestApp({ config: loadConfig({ NODE_ENV: 'production', WAVEFIT_SECRET: 'a-secret-of-enough-length-123' }, { dbPath: ':memory:', publicUrl: 'http://wavefit.test' }) });
    try {
      const res = await request(prod.app).post('/api/auth/login').send({ email: LEAD, password: DEMO_PASSWORD }).expect(200);
      expect(String(res.headers['set-cookie'])).toMatch(/wavefit_token=[^;]+;.*Secure/);
    } finally {
      await prod.close();
    }
  });
});

describe('bounds on typed input', () => {
  let t: TestApp;
  let stats: string;
  let lead: string;
  beforeAll(async () => {
    t = await makeTestApp();
    [stats, lead] = await Promise.all([t.tokenFor(STATS), t.tokenFor(LEAD)]);
  });
  afterAll(async () => {
    await stopJobQueue(t.dataSource);
    await t.close();
  });

  const batch = (body: object) => request(t.app).post(`/api/studies/${t.seed.studyId}/batches`).set(bearer(stats)).send({ chains: 10, ...body });
  const model = (over: object = {}) => ({ rates: [2.5, 2.5], effects: [{ id: 'density', value: -2 }], ...over });

  it('refuses a rate or an effect value beyond the bounds of fit parameters, and stores nothing', async () => {
    const before = await t.counts('batches', 'jobs');
    for (const [m, field, message] of [
      [model({ rates: [1e308, 2.5] }), 'model.rates.0', /at most 10000/],
      [model({ effects: [{ id: 'density', value: 1e308 }] }), 'model.effects.0.value', /between -40 and 40/],
      [model({ effects: [{ id: 'density', value: -41 }] }), 'model.effects.0.value', /between -40 and 40/],
    ] as const) {
      const res = await batch({ model: m });
      expect(res.status).toBe(400);
      expect(res.body.error.code).toBe('validation_failed');
      expect(res.body.error.details.fields[field][0]).toMatch(message);
    }
    expect(await t.counts('batches', 'jobs')).toEqual(before);
    // The bounds themselves are accepted.
    expect((await batch({ model: model({ rates: [10_000, 0.5], effects: [{ id: 'density', value: -40 }] }), chains: 2 })).status).toBe(201);
  });

  it('refuses NUL and control characters in labels and names, keeps line breaks in descriptions', async () => {
    const res = await batch({ model: model(), label: 'night\u0000watch' });
    expect(res.status).toBe(400);
    expect(res.body.error.details.fields.label[0]).toMatch(/control characters/);
    const before = await t.counts('studies', 'model_specs');
    const study = await request(t.app).post('/api/studies').set(bearer(lead)).send({ name: 'Harbour\u0007side', description: '' });
    expect(study.status).toBe(400);
    expect(study.body.error.details.fields.name[0]).toMatch(/control characters/);
    const spec = await request(t.app)
      .post(`/api/studies/${t.seed.studyId}/models`)
      .set(bearer(stats))
      .send({ name: 'Crew\u001b[31m advice', rates: [{ period: 1, estimate: true }, { period: 2, estimate: true }], effects: [{ id: 'density', estimate: true }] });
    expect(spec.status).toBe(400);
    expect(spec.body.error.details.fields.name[0]).toMatch(/control characters/);
    expect(await t.counts('studies', 'model_specs')).toEqual(before);
    const ok = await request(t.app).post('/api/studies').set(bearer(lead)).send({ name: 'Harbourside night watch', description: 'Two lines:\nspring and autumn.' });
    expect(ok.status).toBe(201);
  });
});
