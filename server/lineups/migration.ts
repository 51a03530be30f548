/**
 * Migration: the lineup test (lineups, lineup_picks). Listed in server/db/migrations.ts last, after
 * the sign-off acknowledgement.
 */
import type { MigrationInterface, QueryRunner } from 'typeorm';
import { ddl } from '../db/migrations/ddl';

export class Lineups1733100002000 implements MigrationInterface {
  name = 'Lineups1733100002000';

  async up(q: QueryRunner): Promise<void> {
    await ddl(q, 
      `CREATE TABLE "lineups" ("id" integer PRIMARY KEY AUTOINCREMENT NOT NULL, "studyId" integer NOT NULL, "batchId" integer NOT NULL, "statistic" varchar(40) NOT NULL, "period" integer NOT NULL, "panels" integer NOT NULL, "seed" integer NOT NULL, "plan" text NOT NULL, "createdById" integer, "createdAt" datetime NOT NULL DEFAULT (datetime('now')), CONSTRAINT "FK_lineups_study" FOREIGN KEY ("studyId") REFERENCES "studies" ("id") ON DELETE CASCADE ON UPDATE NO ACTION, CONSTRAINT "FK_lineups_batch" FOREIGN KEY ("batchId") REFERENCES "batches" ("id") ON DELETE CASCADE ON UPDATE NO ACTION, CONSTRAINT "FK_lineups_createdById" FOREIGN KEY ("createdById") REFERENCES "users" ("id") ON DELETE SET NULL ON UPDATE NO ACTION)`,
    );
    await ddl(q, `CREATE INDEX "IDX_lineups_batch" ON "lineups" ("batchId") `);
    await ddl(q, 
      `CREATE TABLE "lineup_picks" ("id" integer PRIMARY KEY AUTOINCREMENT NOT NULL, "lineupId" integer NOT NULL, "studyId" integer NOT NULL, "userId" integer, "userName" varchar(120) NOT NULL, "panel" integer NOT NULL, "correct" boolean NOT NULL, "reason" text NOT NULL, "createdAt" datetime NOT NULL DEFAULT (datetime('now')), CONSTRAINT "UQ_lineup_picks_person" UNIQUE ("lineupId", "userId"), CONSTRAINT "FK_lineup_picks_lineup" FOREIGN KEY ("lineupId") REFERENCES "lineups" ("id") ON DELETE CASCADE ON UPDATE NO ACTION, CONSTRAINT "FK_lineup_picks_study" FOREIGN KEY ("studyId") REFERENCES "studies" ("id") ON DELETE CASCADE ON UPDATE NO ACTION, CONSTRAINT "FK_lineup_picks_userId" FOREIGN KEY ("userId") REFERENCES "users" ("id") ON DELETE SET NULL ON UPDATE NO ACTION)`,
    );
  }

  async down(q: QueryRunner): Promise<void> {
    await ddl(q, `DROP TABLE "lineup_picks"`);
    await ddl(q, `DROP INDEX "IDX_lineups_batch"`);
    await ddl(q, `DROP TABLE "lineups"`);
  }
}
