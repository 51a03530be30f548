/**
 * Migration: the job queue's tables (jobs, job_chunks). Listed in server/db/migrations.ts.
 */
import type { MigrationInterface, QueryRunner } from 'typeorm';
import { ddl } from '../db/migrations/ddl';

export class JobQueue1733100000500 implements MigrationInterface {
  name = 'JobQueue1733100000500';

  async up(q: QueryRunner): Promise<void> {
    await ddl(q, 
      `CREATE TABLE "jobs" ("id" integer PRIMARY KEY AUTOINCREMENT NOT NULL, "kind" varchar(40) NOT NULL, "payload" text NOT NULL, "state" varchar(12) NOT NULL DEFAULT ('queued'), "progressDone" integer NOT NULL DEFAULT (0), "progressTotal" integer NOT NULL DEFAULT (0), "chunksDone" integer NOT NULL DEFAULT (0), "chunksTotal" integer NOT NULL DEFAULT (0), "log" text NOT NULL DEFAULT (''), "attempts" integer NOT NULL DEFAULT (0), "error" text, "createdAt" datetime NOT NULL DEFAULT (datetime('now')), "startedAt" datetime, "finishedAt" datetime, "updatedAt" datetime NOT NULL DEFAULT (datetime('now')))`,
    );
    await ddl(q, `CREATE INDEX "IDX_jobs_state" ON "jobs" ("state")`);
    await ddl(q, 
      `CREATE TABLE "job_chunks" ("jobId" integer NOT NULL, "chunkIndex" integer NOT NULL, "units" integer NOT NULL, "workMs" integer NOT NULL DEFAULT (0), "finishedAt" datetime NOT NULL DEFAULT (datetime('now')), CONSTRAINT "FK_job_chunks_job" FOREIGN KEY ("jobId") REFERENCES "jobs" ("id") ON DELETE CASCADE ON UPDATE NO ACTION, PRIMARY KEY ("jobId", "chunkIndex"))`,
    );
  }

  async down(q: QueryRunner): Promise<void> {
    await ddl(q, `DROP TABLE "job_chunks"`);
    await ddl(q, `DROP INDEX "IDX_jobs_state"`);
    await ddl(q, `DROP TABLE "jobs"`);
  }
}
