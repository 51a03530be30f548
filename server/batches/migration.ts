/**
 * Migration: simulation batches (batches, batch_results, batch_tie_counts). Listed in
 * server/db/migrations.ts, after the job queue's tables.
 */
import type { MigrationInterface, QueryRunner } from 'typeorm';
import { ddl } from '../db/migrations/ddl';

export class Batches1733100000900 implements MigrationInterface {
  name = 'Batches1733100000900';

  async up(q: QueryRunner): Promise<void> {
    await ddl(q, 
      `CREATE TABLE "batches" ("id" integer PRIMARY KEY AUTOINCREMENT NOT NULL, "studyId" integer NOT NULL, "jobId" integer, "fitId" integer, "createdById" integer, "label" varchar(120) NOT NULL, "model" text NOT NULL, "periods" text NOT NULL, "chains" integer NOT NULL, "seed" integer NOT NULL, "statistics" text NOT NULL, "maxima" text NOT NULL, "layout" text NOT NULL, "observed" text NOT NULL, "actorCount" integer NOT NULL, "createdAt" datetime NOT NULL DEFAULT (datetime('now')), CONSTRAINT "FK_batches_study" FOREIGN KEY ("studyId") REFERENCES "studies" ("id") ON DELETE CASCADE ON UPDATE NO ACTION, CONSTRAINT "FK_batches_job" FOREIGN KEY ("jobId") REFERENCES "jobs" ("id") ON DELETE SET NULL ON UPDATE NO ACTION, CONSTRAINT "FK_batches_created_by" FOREIGN KEY ("createdById") REFERENCES "users" ("id") ON DELETE SET NULL ON UPDATE NO ACTION)`,
    );
    await ddl(q, `CREATE INDEX "IDX_batches_study" ON "batches" ("studyId")`);
    await ddl(q, 
      `CREATE TABLE "batch_results" ("batchId" integer NOT NULL, "period" integer NOT NULL, "chunkIndex" integer NOT NULL, "firstChain" integer NOT NULL, "chains" integer NOT NULL, "data" blob NOT NULL, CONSTRAINT "FK_batch_results_batch" FOREIGN KEY ("batchId") REFERENCES "batches" ("id") ON DELETE CASCADE ON UPDATE NO ACTION, PRIMARY KEY ("batchId", "period", "chunkIndex"))`,
    );
    await ddl(q, 
      `CREATE TABLE "batch_tie_counts" ("batchId" integer NOT NULL, "period" integer NOT NULL, "actors" integer NOT NULL, "networks" integer NOT NULL, "tieTotal" integer NOT NULL, "counts" blob NOT NULL, CONSTRAINT "FK_batch_tie_counts_batch" FOREIGN KEY ("batchId") REFERENCES "batches" ("id") ON DELETE CASCADE ON UPDATE NO ACTION, PRIMARY KEY ("batchId", "period"))`,
    );
  }

  async down(q: QueryRunner): Promise<void> {
    await ddl(q, `DROP TABLE "batch_tie_counts"`);
    await ddl(q, `DROP TABLE "batch_results"`);
    await ddl(q, `DROP INDEX "IDX_batches_study"`);
    await ddl(q, `DROP TABLE "batches"`);
  }
}

/**
 * Migration: batch_gof, the goodness of fit of each finished batch computed once and kept
 * (server/batches/gofStore.ts). Listed in server/db/migrations.ts after the sessions.
 */
export class BatchGof1733100002300 implements MigrationInterface {
  name = 'BatchGof1733100002300';

  async up(q: QueryRunner): Promise<void> {
    await ddl(q, 
      `CREATE TABLE "batch_gof" ("batchId" integer NOT NULL, "period" integer NOT NULL, "coverages" varchar(60) NOT NULL, "results" text NOT NULL, CONSTRAINT "FK_batch_gof_batch" FOREIGN KEY ("batchId") REFERENCES "batches" ("id") ON DELETE CASCADE ON UPDATE NO ACTION, PRIMARY KEY ("batchId", "period", "coverages"))`,
    );
  }

  async down(q: QueryRunner): Promise<void> {
    await ddl(q, `DROP TABLE "batch_gof"`);
  }
}
