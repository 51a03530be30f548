/**
 * Migration: re-fit studies (refits, refit_results). Listed in server/db/migrations.ts, after the
 * stored GOF views.
 */
import type { MigrationInterface, QueryRunner } from 'typeorm';
import { ddl } from '../db/migrations/ddl';

export class Refits1733100002400 implements MigrationInterface {
  name = 'Refits1733100002400';

  async up(q: QueryRunner): Promise<void> {
    await ddl(q,
      `CREATE TABLE "refits" ("id" integer PRIMARY KEY AUTOINCREMENT NOT NULL, "studyId" integer NOT NULL, "jobId" integer, "createdById" integer, "label" varchar(120) NOT NULL, "models" text NOT NULL, "replications" integer NOT NULL, "cross" boolean NOT NULL, "seed" integer NOT NULL, "phase3Runs" integer NOT NULL, "createdAt" datetime NOT NULL DEFAULT (datetime('now')), CONSTRAINT "FK_refits_study" FOREIGN KEY ("studyId") REFERENCES "studies" ("id") ON DELETE CASCADE ON UPDATE NO ACTION, CONSTRAINT "FK_refits_job" FOREIGN KEY ("jobId") REFERENCES "jobs" ("id") ON DELETE SET NULL ON UPDATE NO ACTION, CONSTRAINT "FK_refits_created_by" FOREIGN KEY ("createdById") REFERENCES "users" ("id") ON DELETE SET NULL ON UPDATE NO ACTION)`,
    );
    await ddl(q, `CREATE INDEX "IDX_refits_study" ON "refits" ("studyId") `);
    await ddl(q,
      `CREATE TABLE "refit_results" ("refitId" integer NOT NULL, "chunkIndex" integer NOT NULL, "source" integer NOT NULL, "target" integer NOT NULL, "replication" integer NOT NULL, "finished" boolean NOT NULL, "converged" boolean NOT NULL, "maxAbsT" real, "tauMax" real, "estimates" blob NOT NULL, "ses" blob NOT NULL, "seconds" real NOT NULL, "error" text, CONSTRAINT "FK_refit_results_refit" FOREIGN KEY ("refitId") REFERENCES "refits" ("id") ON DELETE CASCADE ON UPDATE NO ACTION, PRIMARY KEY ("refitId", "chunkIndex"))`,
    );
  }

  async down(q: QueryRunner): Promise<void> {
    await ddl(q, `DROP TABLE "refit_results"`);
    await ddl(q, `DROP INDEX "IDX_refits_study"`);
    await ddl(q, `DROP TABLE "refits"`);
  }
}
