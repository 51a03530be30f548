/**
 * PostgreSQL for a shared deployment: a private cluster of Debian's postgresql on a loopback port
 * (./pgCluster.ts), the same entities and the same migrations as on SQLite.
 * - every migration applies, TypeORM finds nothing the entities need beyond them (as
 *   tests/api/schema.test.ts checks on SQLite), and all of them revert and apply again;
 * - a smoke run through the API: seed, sign in, list studies, create a study, upload data and read
 *   its summary back (the same expected figures as tests/api/data.test.ts, worked by hand there);
 * - queueing a batch is refused with a plain message: the job queue and the review features still
 *   write through the synchronous SQLite handle (see docs in README "Deployment").
 * Skipped, with a line saying so, when Debian's postgresql is missing (scripts/test.sh installs it).
 */
import request from 'supertest';
import type { DataSource } from 'typeorm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createApp } from '../../server/app';
import { testConfig } from '../../server/config';
import { createDataSource, openDataSource } from '../../server/db/dataSource';
import { migrations } from '../../server/db/migrations';
import { DEMO_PASSWORD, seedDemo } from '../../server/demo/seed';
import { createOutboxMailer } from '../../server/mail/mailer';
import type { DataUploadBody } from '../../shared/data';
import { hasPostgres, startPgCluster, type PgCluster } from './pgCluster';

const GOOD: DataUploadBody = {
  format: 'edgelist',
  waves: [
    { label: 'spring', fileName: 'spring.csv', content: 'sender,receiver\nAri,Bex\nBex,Ari\nBex,Cato\nCato,Dara\nDara,Ari\n' },
    { label: 'summer', fileName: 'summer.csv', content: 'Ari,Bex\nBex,Ari\nAri,Cato\nCato,Dara\nDara,Cato\nBex,Dara,NA\n' },
  ],
  actors: { fileName: 'crew.csv', content: 'label,years,watch,drills@1,drills@2\nAri,3,Heron,4,5\nBex,12,Kestrel,NA,2\nCato,1,Heron,1,1\nDara,7,Puffin,0,3\n' },
};

if (!hasPostgres()) console.log('PostgreSQL test skipped: Debian postgresql is missing (apt-get install -y postgresql)');

describe.skipIf(!hasPostgres())('PostgreSQL', () => {
  let pg: PgCluster;
  beforeAll(async () => {
    pg = await startPgCluster();
  }, 120_000);
  afterAll(() => pg?.stop());

  it('migrations apply, agree with the entities, revert and apply again', async () => {
    const ds = createDataSource({ database: '', postgresUrl: pg.url, migrationsRun: false });
    await ds.initialize();
    try {
      const applied = await ds.runMigrations({ transaction: 'each' });
      expect(applied.map((m) => m.name)).toEqual(migrations.map((m) => new m().name));
      const pending = await ds.driver.createSchemaBuilder().log();
      expect(pending.upQueries.map((q) => q.query)).toEqual([]);
      // Column types PostgreSQL got for the SQLite words (ddl.ts).
      const cols = await ds.query(
        `SELECT table_name, column_name, data_type, is_identity FROM information_schema.columns WHERE table_schema = 'public' AND (table_name, column_name) IN (('waves', 'adjacency'), ('users', 'createdAt'), ('users', 'id'), ('users', 'isAdmin'))`,
      );
      const byName = Object.fromEntries(cols.map((c: Record<string, string>) => [`${c.table_name}.${c.column_name}`, c]));
      expect(byName['waves.adjacency'].data_type).toBe('bytea');
      expect(byName['users.createdAt'].data_type).toBe('timestamp without time zone');
      expect(byName['users.id'].is_identity).toBe('YES');
      expect(byName['users.isAdmin'].data_type).toBe('boolean');
      for (let i = 0; i < migrations.length; i++) await ds.undoLastMigration({ transaction: 'each' });
      const left = await ds.query(`SELECT table_name FROM information_schema.tables WHERE table_schema = 'public' AND table_name <> 'migrations'`);
      expect(left).toEqual([]);
      expect((await ds.runMigrations({ transaction: 'each' })).length).toBe(migrations.length);
    } finally {
      await ds.destroy();
    }
  }, 120_000);

  it('smoke: seed, sign in, studies, upload data and read it back; a batch is refused plainly', async () => {
    const ds: DataSource = await openDataSource({ database: '', postgresUrl: pg.url });
    try {
      const config = testConfig();
      const app = createApp({ dataSource: ds, mailer: createOutboxMailer({ from: config.mailFrom }), config }, { logError: () => undefined });
      await seedDemo(ds, { passwordHash: { memoryCost: 1024, timeCost: 1, parallelism: 1 } });
      const login = await request(app).post('/api/auth/login').send({ email: 'lead@harbourside.example', password: DEMO_PASSWORD });
      expect(login.status).toBe(200);
      const auth = { Authorization: `Bearer ${login.body.token}` };
      const bad = await request(app).post('/api/auth/login').send({ email: 'lead@harbourside.example', password: 'not-the-password' });
      expect(bad.status).toBe(401);

      const list = await request(app).get('/api/studies').set(auth);
      expect(list.status).toBe(200);
      expect(list.body.studies[0]).toMatchObject({ waveCount: 3, actorCount: 24 });

      const created = await request(app).post('/api/studies').set(auth).send({ name: 'Winter drills', description: '' });
      expect(created.status).toBe(201);
      const studyId = created.body.study.id;
      const up = await request(app).post(`/api/studies/${studyId}/data`).set(auth).send(GOOD);
      expect(up.status).toBe(201);
      expect(up.body.message).toBe('Stored 2 waves of 4 actors and 3 covariates.');
      // spring: 5 ties of 12 pairs, one mutual dyad (worked by hand, as in tests/api/data.test.ts)
      expect(up.body.waves[0]).toEqual({ index: 1, label: 'spring', actors: 4, ties: 5, density: 5 / 12, reciprocity: 2 / 5, missing: 0 });
      const back = await request(app).get(`/api/studies/${studyId}/data`).set(auth);
      expect(back.status).toBe(200);
      expect(back.body.waves.map((w: { ties: number }) => w.ties)).toEqual([5, 5]);
      // Malformed upload: a clear message, nothing stored changes.
      const wrong = await request(app).post(`/api/studies/${studyId}/data`).set(auth).send({ ...GOOD, waves: [{ label: 'x', fileName: 'x.csv', content: 'Ari\n' }] });
      expect(wrong.status).toBe(400);
      expect((await request(app).get(`/api/studies/${studyId}/data`).set(auth)).body.waves).toEqual(back.body.waves);

      const demoId = list.body.studies[0].id;
      const batch = await request(app)
        .post(`/api/studies/${demoId}/batches`)
        .set(auth)
        .send({ model: { rates: [2, 2], effects: [{ id: 'density', value: -1 }] }, chains: 20, seed: 1 });
      expect(batch.status).toBe(501);
      expect(batch.body.error.message).toMatch(/PostgreSQL/);
    } finally {
      await ds.destroy();
    }
  }, 120_000);
});

describe('database settings', () => {
  it('every migration runs its SQL through ddl() (so it works on PostgreSQL too)', async () => {
    const { readdirSync, readFileSync, statSync } = await import('node:fs');
    const { join } = await import('node:path');
    const root = join(__dirname, '../../server');
    const files: string[] = [];
    const walk = (dir: string) => {
      for (const e of readdirSync(dir)) {
        const p = join(dir, e);
        if (statSync(p).isDirectory()) walk(p);
        else if (/migration\.ts$/.test(e) || (dir.endsWith('migrations') && e.endsWith('.ts') && e !== 'ddl.ts')) files.push(p);
      }
    };
    walk(root);
    expect(files.length).toBeGreaterThanOrEqual(8);
    const raw = files.filter((f) => /\bq\.query\(/.test(readFileSync(f, 'utf8'))).map((f) => f.slice(root.length + 1));
    expect(raw).toEqual([]);
  });

  it('SQLite unless DATABASE_URL names PostgreSQL; wrong settings are refused with a plain message', async () => {
    const { postgresUrlFromEnv } = await import('../../server/config');
    expect(postgresUrlFromEnv({})).toBeNull();
    expect(postgresUrlFromEnv({ DATABASE_URL: 'postgres://u@h:5432/d' })).toBe('postgres://u@h:5432/d');
    expect(postgresUrlFromEnv({ WAVEFIT_DB_TYPE: 'sqlite', DATABASE_URL: 'postgres://u@h/d' })).toBeNull();
    expect(() => postgresUrlFromEnv({ WAVEFIT_DB_TYPE: 'postgres' })).toThrow(/needs DATABASE_URL=postgres:\/\//);
    expect(() => postgresUrlFromEnv({ WAVEFIT_DB_TYPE: 'mysql' })).toThrow(/must be sqlite or postgres, got "mysql"/);
  });

  it('"?" placeholders become $1, $2 ... outside quotes', async () => {
    const { numberPlaceholders } = await import('../../server/db/dataSource');
    expect(numberPlaceholders(`SELECT "a?" FROM t WHERE x = ? AND y IN (?, ?) AND z = '?'`)).toBe(`SELECT "a?" FROM t WHERE x = $1 AND y IN ($2, $3) AND z = '?'`);
    expect(numberPlaceholders('SELECT 1 WHERE a = $1')).toBe('SELECT 1 WHERE a = $1');
  });
});
