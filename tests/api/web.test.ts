/**
 * One process serves the API and the exported web app: static files, the SPA fallback, and /api kept
 * apart; answers are compressed for clients that accept it (the `compression` middleware), files
 * with a content hash in their name are cached for a year as immutable, index.html is revalidated
 * (RFC 9111 Cache-Control; RFC 8246 "immutable").
 */
import { createServer, get, type IncomingHttpHeaders } from 'node:http';
import type { AddressInfo } from 'node:net';
import { gunzipSync } from 'node:zlib';
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { serveWebApp } from '../../server/main';
import { makeTestApp, type TestApp } from './helpers';

let t: TestApp;
let dist: string;
const HASH = '0123456789abcdef0123456789abcdef';
const BIG_JS = Array.from({ length: 400 }, (_, i) => `console.log("Harbourside chunk line ${i}");`).join('\n');

/** A GET on a listening copy of the app, with the bytes exactly as sent (no decoding). */
async function rawGet(path: string, headers: Record<string, string>): Promise<{ status: number; headers: IncomingHttpHeaders; body: Buffer }> {
  const server = createServer(t.app);
  await new Promise<void>((ok) => server.listen(0, '127.0.0.1', () => ok()));
  const { port } = server.address() as AddressInfo;
  try {
    return await new Promise((ok, fail) => {
      get({ host: '127.0.0.1', port, path, headers }, (res) => {
        const chunks: Buffer[] = [];
        res.on('data', (c: Buffer) => chunks.push(c));
        res.on('end', () => ok({ status: res.statusCode ?? 0, headers: res.headers, body: Buffer.concat(chunks) }));
        res.on('error', fail);
      }).on('error', fail);
    });
  } finally {
    server.closeAllConnections();
    await new Promise<void>((ok) => server.close(() => ok()));
  }
}

beforeAll(async () => {
  t = await makeTestApp();
  dist = mkdtempSync(join(tmpdir(), 'wavefit-dist-'));
  mkdirSync(join(dist, '_expo'));
  writeFileSync(join(dist, 'index.html'), '<!doctype html><title>Wavefit</title>');
  writeFileSync(join(dist, '_expo', 'entry.js'), 'console.log(1)');
  mkdirSync(join(dist, '_expo', 'static', 'js', 'web'), { recursive: true });
  writeFileSync(join(dist, '_expo', 'static', 'js', 'web', `entry-${HASH}.js`), BIG_JS);
  serveWebApp(t.app, dist);
});
afterAll(async () => {
  await t.close();
  rmSync(dist, { recursive: true, force: true });
});

describe('web app beside the API', () => {
  it('serves files, and index.html for app paths', async () => {
    const js = await request(t.app).get('/_expo/entry.js');
    expect(js.status).toBe(200);
    expect(js.headers['content-type']).toMatch(/javascript/);
    for (const path of ['/', '/studies/1/data', '/invite/some-token']) {
      const page = await request(t.app).get(path);
      expect(page.status).toBe(200);
      expect(page.text).toContain('<title>Wavefit</title>');
    }
  });

  it('keeps /api answers in JSON and missing files as 404', async () => {
    const api = await request(t.app).get('/api/unknown');
    expect(api.status).toBe(404);
    expect(api.body.error.code).toBe('not_found');
    expect((await request(t.app).get('/_expo/missing.js')).status).toBe(404);
    expect((await request(t.app).get('/api/health')).body.ok).toBe(true);
  });

  it('compresses for clients that accept gzip, and sends hashed files as immutable for a year', async () => {
    const path = `/_expo/static/js/web/entry-${HASH}.js`;
    const gz = await rawGet(path, { 'Accept-Encoding': 'gzip' });
    expect(gz.status).toBe(200);
    expect(gz.headers['content-encoding']).toBe('gzip');
    expect(gz.headers['cache-control']).toBe('public, max-age=31536000, immutable');
    expect(gz.body.length).toBeLessThan(BIG_JS.length / 4);
    expect(gunzipSync(gz.body).toString('utf8')).toBe(BIG_JS);
    // A client that does not accept compression gets the plain file.
    const plain = await rawGet(path, { 'Accept-Encoding': 'identity' });
    expect(plain.headers['content-encoding']).toBeUndefined();
    expect(plain.body.toString('utf8')).toBe(BIG_JS);
  });

  it('revalidates index.html and files without a hash', async () => {
    for (const path of ['/', '/sign-in']) {
      const page = await request(t.app).get(path);
      expect(page.headers['cache-control']).toBe('no-cache');
    }
    expect((await request(t.app).get('/_expo/entry.js')).headers['cache-control']).toBe('no-cache');
  });

  it('compresses API answers above 1 kB too', async () => {
    const login = await request(t.app).post('/api/auth/login').send({ email: 'lead@harbourside.example', password: 'wavefit-demo-1' });
    const res = await rawGet(`/api/studies/${t.seed.studyId}/data`, { 'Accept-Encoding': 'gzip', Authorization: `Bearer ${login.body.token}` });
    expect(res.status).toBe(200);
    expect(res.headers['content-encoding']).toBe('gzip');
    const json = JSON.parse(gunzipSync(res.body).toString('utf8'));
    expect(json.waves.length).toBeGreaterThan(0);
    // Small answers stay plain (below the middleware's 1 kB threshold).
    expect((await rawGet('/api/health', { 'Accept-Encoding': 'gzip' })).headers['content-encoding']).toBeUndefined();
  });
});
