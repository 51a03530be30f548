/**
 * Migration: model specifications and fits (model_specs, fits). Listed in
 * server/db/migrations.ts after the batches.
 */
import type { MigrationInterface, QueryRunner } from 'typeorm';
import { ddl } from '../db/migrations/ddl';

export class Models1733100001000 implements MigrationInterface {
  name = 'Models1733100001000';

  async up(q: QueryRunner): Promise<void> {
    await ddl(q, 
      `CREATE TABLE "model_specs" ("id" integer PRIMARY KEY AUTOINCREMENT NOT NULL, "studyId" integer NOT NULL, "name" varchar(120) NOT NULL, "description" text NOT NULL DEFAULT (''), "spec" text NOT NULL, "createdById" integer, "createdAt" datetime NOT NULL DEFAULT (datetime('now')), "updatedAt" datetime NOT NULL DEFAULT (datetime('now')), CONSTRAINT "FK_model_specs_study" FOREIGN KEY ("studyId") REFERENCES "studies" ("id") ON DELETE CASCADE ON UPDATE NO ACTION, CONSTRAINT "FK_model_specs_created_by" FOREIGN KEY ("createdById") REFERENCES "users" ("id") ON DELETE SET NULL ON UPDATE NO ACTION)`,
    );
    await ddl(q, `CREATE INDEX "IDX_model_specs_study" ON "model_specs" ("studyId") `);
    await ddl(q, 
      `CREATE TABLE "fits" ("id" integer PRIMARY KEY AUTOINCREMENT NOT NULL, "studyId" integer NOT NULL, "modelId" integer NOT NULL, "jobId" integer, "mode" varchar(16) NOT NULL, "state" varchar(16) NOT NULL, "seed" integer NOT NULL, "phase3Runs" integer NOT NULL, "startFromId" integer, "spec" text NOT NULL, "plan" text NOT NULL, "results" text, "error" text, "createdById" integer, "createdAt" datetime NOT NULL DEFAULT (datetime('now')), "finishedAt" datetime, CONSTRAINT "FK_fits_study" FOREIGN KEY ("studyId") REFERENCES "studies" ("id") ON DELETE CASCADE ON UPDATE NO ACTION, CONSTRAINT "FK_fits_model" FOREIGN KEY ("modelId") REFERENCES "model_specs" ("id") ON DELETE CASCADE ON UPDATE NO ACTION, CONSTRAINT "FK_fits_job" FOREIGN KEY ("jobId") REFERENCES "jobs" ("id") ON DELETE SET NULL ON UPDATE NO ACTION, CONSTRAINT "FK_fits_created_by" FOREIGN KEY ("createdById") REFERENCES "users" ("id") ON DELETE SET NULL ON UPDATE NO ACTION)`,
    );
    await ddl(q, `CREATE INDEX "IDX_fits_model" ON "fits" ("modelId") `);
    await ddl(q, `CREATE INDEX "IDX_fits_study" ON "fits" ("studyId") `);
  }

  async down(q: QueryRunner): Promise<void> {
    await ddl(q, `DROP INDEX "IDX_fits_study"`);
    await ddl(q, `DROP INDEX "IDX_fits_model"`);
    await ddl(q, `DROP TABLE "fits"`);
    await ddl(q, `DROP INDEX "IDX_model_specs_study"`);
    await ddl(q, `DROP TABLE "model_specs"`);
  }
}
