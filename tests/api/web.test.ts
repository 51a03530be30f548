/** One process serves the API and the exported web app: static files, the SPA fallback, and /api kept apart. */
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { serveWebApp } from '../../server/main';
import { makeTestApp, type TestApp } from './helpers';

let t: TestApp;
let dist: string;
beforeAll(async () => {
  t = await makeTestApp();
  dist = mkdtempSync(join(tmpdir(), 'wavefit-dist-'));
  mkdirSync(join(dist, '_expo'));
  writeFileSync(join(dist, 'index.html'), '<!doctype html><title>Wavefit</title>');
  writeFileSync(join(dist, '_expo', 'entry.js'), 'console.log(1)');
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
});
