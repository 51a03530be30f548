/**
 * The database: migrations build exactly the schema the entities describe, SQLite runs in WAL mode
 * with foreign keys enforced (SQLite documentation: "Write-Ahead Logging", "SQLite Foreign Key
 * Support"), migrations can be undone and redone, and the demo seed is idempotent.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { seedDemo } from '../../server/demo/seed';
import { makeTestApp, type TestApp } from './helpers';

let t: TestApp;
beforeAll(async () => {
  t = await makeTestApp({ file: true });
});
afterAll(async () => t.close());

describe('schema', () => {
  it('has nothing left for TypeORM to synchronise after the migrations ran', async () => {
    const log = await t.dataSource.driver.createSchemaBuilder().log();
    expect(log.upQueries.map((q) => q.query)).toEqual([]);
  });

  it('uses WAL and enforces foreign keys', async () => {
    expect(await t.dataSource.query('PRAGMA journal_mode')).toEqual([{ journal_mode: 'wal' }]);
    expect(await t.dataSource.query('PRAGMA foreign_keys')).toEqual([{ foreign_keys: 1 }]);
    await expect(
      t.dataSource.query(`INSERT INTO "memberships" ("userId", "studyId", "role") VALUES (9999, 9999, 'lead')`),
    ).rejects.toThrow(/FOREIGN KEY/);
  });

  it('keeps one membership per user and study', async () => {
    const [m] = await t.dataSource.query('SELECT "userId", "studyId" FROM "memberships" LIMIT 1');
    await expect(
      t.dataSource.query(`INSERT INTO "memberships" ("userId", "studyId", "role") VALUES (?, ?, 'reviewer')`, [m.userId, m.studyId]),
    ).rejects.toThrow(/UNIQUE/);
  });

  it('re-running the seed adds nothing', async () => {
    const tables = ['users', 'studies', 'memberships', 'actors', 'waves', 'covariates'];
    const before = await t.counts(...tables);
    expect(before).toMatchObject({ actors: 24, waves: 3, covariates: 4 });
    const again = await seedDemo(t.dataSource, { passwordHash: t.config.passwordHash });
    expect(again.createdUsers).toEqual([]);
    expect(again.createdStudy).toBe(false);
    expect(again.createdData).toBe(false);
    expect(again.studyId).toBe(t.seed.studyId);
    expect(await t.counts(...tables)).toEqual(before);
  });

  it('undoes and redoes every migration', async () => {
    const migrationCount = t.dataSource.migrations.length;
    const fresh = await makeTestApp();
    try {
      for (let i = 0; i < migrationCount; i++) await fresh.dataSource.undoLastMigration({ transaction: 'each' });
      const left = await fresh.dataSource.query(
        `SELECT name FROM sqlite_master WHERE type = 'table' AND name NOT IN ('migrations', 'sqlite_sequence')`,
      );
      expect(left).toEqual([]);
      const applied = await fresh.dataSource.runMigrations({ transaction: 'each' });
      expect(applied).toHaveLength(migrationCount);
      const log = await fresh.dataSource.driver.createSchemaBuilder().log();
      expect(log.upQueries).toEqual([]);
    } finally {
      await fresh.close();
    }
  });

  it('deleting a study removes everything that belongs to it', async () => {
    const study = t.seed.studyId;
    await t.dataSource.query('DELETE FROM "studies" WHERE id = ?', [study]);
    for (const table of ['memberships', 'invitations', 'actors', 'waves', 'covariates']) {
      const [row] = await t.dataSource.query(`SELECT COUNT(*) AS n FROM "${table}" WHERE "studyId" = ?`, [study]);
      expect(Number(row.n), table).toBe(0);
    }
  });
});
