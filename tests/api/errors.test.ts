/**
 * Bad requests get a clear JSON error { error: { code, message, details? } } and change nothing
 * stored (rows counted before and after); unexpected failures give 500 without internals.
 */
import jwt from 'jsonwebtoken';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { LEAD, bearer, makeTestApp, type TestApp } from './helpers';

let t: TestApp;
let token: string;
const TABLES = ['users', 'studies', 'memberships', 'invitations'];
beforeAll(async () => {
  t = await makeTestApp();
  token = await t.tokenFor(LEAD);
});
afterAll(async () => t.close());

describe('malformed requests', () => {
  it('malformed JSON: 400 malformed_json, nothing stored', async () => {
    const before = await t.counts(...TABLES);
    const res = await request(t.app)
      .post('/api/studies')
      .set(bearer(token))
      .set('Content-Type', 'application/json')
      .send('{"name": "Half a study",');
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('malformed_json');
    expect(res.body.error.message).toMatch(/not valid JSON/);
    expect(await t.counts(...TABLES)).toEqual(before);
  });

  it('a body failing the schema: 400 with a message per field, nothing stored', async () => {
    const before = await t.counts(...TABLES);
    const res = await request(t.app).post('/api/studies').set(bearer(token)).send({ name: 'ab', description: 42 });
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('validation_failed');
    expect(res.body.error.details.fields.name).toEqual(['A study name needs at least 3 characters.']);
    expect(res.body.error.details.fields.description).toHaveLength(1);
    expect(res.body.error.message).toContain('name: A study name needs at least 3 characters.');
    expect(await t.counts(...TABLES)).toEqual(before);
  });

  it('a JSON array, a missing body and a non-JSON body are refused clearly', async () => {
    const before = await t.counts(...TABLES);
    const array = await request(t.app).post('/api/studies').set(bearer(token)).send([{ name: 'List study' }]);
    expect(array.status).toBe(400);
    expect(array.body.error.code).toBe('validation_failed');
    const none = await request(t.app).post('/api/studies').set(bearer(token));
    expect(none.status).toBe(400);
    expect(none.body.error.message).toMatch(/needs a JSON body/);
    const text = await request(t.app).post('/api/studies').set(bearer(token)).set('Content-Type', 'text/plain').send('name=Plain');
    expect(text.status).toBe(400);
    expect(text.body.error.message).toMatch(/Content-Type: application\/json/);
    expect(await t.counts(...TABLES)).toEqual(before);
  });

  it('a body over the limit: 413 payload_too_large', async () => {
    const res = await request(t.app).post('/api/studies').set(bearer(token)).send({ name: 'Big', description: 'x'.repeat(1_100_000) });
    expect(res.status).toBe(413);
    expect(res.body.error.code).toBe('payload_too_large');
  });

  it('unknown API routes: 404 in the same shape', async () => {
    const res = await request(t.app).get('/api/no-such-thing?x=1');
    expect(res.status).toBe(404);
    expect(res.body).toEqual({ error: { code: 'not_found', message: 'There is no API endpoint GET /api/no-such-thing.' } });
    const id = await request(t.app).get('/api/studies/not-a-number').set(bearer(token));
    expect(id.status).toBe(404);
    expect(id.body.error.message).toBe('Study not found.');
  });
});

describe('unexpected failures', () => {
  it('answer 500 with a plain message and no stack trace, and log the error', async () => {
    const broken = await makeTestApp();
    const valid = jwt.sign({ sub: '1', ep: 0, jti: 'b'.repeat(32) }, broken.config.secret, { algorithm: 'HS256', expiresIn: 60 });
    await broken.dataSource.destroy(); // every query now throws
    const res = await request(broken.app).get('/api/studies').set(bearer(valid));
    expect(res.status).toBe(500);
    expect(res.body).toEqual({
      error: { code: 'internal', message: 'Something went wrong on the server. The problem has been logged.' },
    });
    expect(JSON.stringify(res.body)).not.toMatch(/at |\.ts|typeorm/i);
    expect(broken.loggedErrors).toHaveLength(1);
    await broken.close();
  });

  it('health answers with the version and whether the dev outbox is mounted', async () => {
    const res = await request(t.app).get('/api/health');
    expect(res.body).toEqual({ ok: true, version: t.config.version, devOutbox: false });
  });

  it('the dev outbox is absent unless asked for, and absent in production even when asked for', async () => {
    await request(t.app).get('/api/dev/outbox').expect(404);
    const prod = await makeTestApp({ config: { isProduction: true, nodeEnv: 'production', devOutbox: true } });
    const res = await request(prod.app).get('/api/dev/outbox');
    expect(res.status).toBe(404);
    expect((await request(prod.app).get('/api/health')).body.devOutbox).toBe(false);
    await prod.close();
  });
});
