/**
 * Migration: the review board (verdicts, verdict_history, review_comments, review_requests,
 * report_signoffs) and notifications (notification_preferences, notification_events). Listed in
 * server/db/migrations.ts after the models.
 */
import type { MigrationInterface, QueryRunner } from 'typeorm';
import { ddl } from '../db/migrations/ddl';

export class Review1733100001200 implements MigrationInterface {
  name = 'Review1733100001200';

  async up(q: QueryRunner): Promise<void> {
    await ddl(q, 
      `CREATE TABLE "verdicts" ("id" integer PRIMARY KEY AUTOINCREMENT NOT NULL, "studyId" integer NOT NULL, "batchId" integer NOT NULL, "statistic" varchar(40) NOT NULL, "period" integer NOT NULL, "verdict" varchar(10) NOT NULL, "note" text NOT NULL DEFAULT (''), "version" integer NOT NULL, "updatedById" integer, "createdAt" datetime NOT NULL DEFAULT (datetime('now')), "updatedAt" datetime NOT NULL, CONSTRAINT "UQ_verdicts_card" UNIQUE ("batchId", "statistic", "period"), CONSTRAINT "FK_verdicts_study" FOREIGN KEY ("studyId") REFERENCES "studies" ("id") ON DELETE CASCADE ON UPDATE NO ACTION, CONSTRAINT "FK_verdicts_batch" FOREIGN KEY ("batchId") REFERENCES "batches" ("id") ON DELETE CASCADE ON UPDATE NO ACTION, CONSTRAINT "FK_verdicts_updatedById" FOREIGN KEY ("updatedById") REFERENCES "users" ("id") ON DELETE SET NULL ON UPDATE NO ACTION)`,
    );
    await ddl(q, `CREATE INDEX "IDX_verdicts_study" ON "verdicts" ("studyId") `);
    await ddl(q, 
      `CREATE TABLE "verdict_history" ("id" integer PRIMARY KEY AUTOINCREMENT NOT NULL, "verdictId" integer NOT NULL, "batchId" integer NOT NULL, "statistic" varchar(40) NOT NULL, "period" integer NOT NULL, "version" integer NOT NULL, "userId" integer, "userName" varchar(120) NOT NULL, "previousVerdict" varchar(10), "verdict" varchar(10) NOT NULL, "previousNote" text, "note" text NOT NULL, "createdAt" datetime NOT NULL DEFAULT (datetime('now')), CONSTRAINT "UQ_verdict_history_version" UNIQUE ("verdictId", "version"), CONSTRAINT "FK_verdict_history_verdict" FOREIGN KEY ("verdictId") REFERENCES "verdicts" ("id") ON DELETE CASCADE ON UPDATE NO ACTION, CONSTRAINT "FK_verdict_history_batch" FOREIGN KEY ("batchId") REFERENCES "batches" ("id") ON DELETE CASCADE ON UPDATE NO ACTION, CONSTRAINT "FK_verdict_history_userId" FOREIGN KEY ("userId") REFERENCES "users" ("id") ON DELETE SET NULL ON UPDATE NO ACTION)`,
    );
    await ddl(q, `CREATE INDEX "IDX_verdict_history_batch" ON "verdict_history" ("batchId") `);
    await ddl(q, 
      `CREATE TABLE "review_comments" ("id" integer PRIMARY KEY AUTOINCREMENT NOT NULL, "studyId" integer NOT NULL, "batchId" integer NOT NULL, "statistic" varchar(40) NOT NULL, "period" integer NOT NULL, "authorId" integer, "authorName" varchar(120) NOT NULL, "body" text NOT NULL, "createdAt" datetime NOT NULL DEFAULT (datetime('now')), CONSTRAINT "FK_review_comments_study" FOREIGN KEY ("studyId") REFERENCES "studies" ("id") ON DELETE CASCADE ON UPDATE NO ACTION, CONSTRAINT "FK_review_comments_batch" FOREIGN KEY ("batchId") REFERENCES "batches" ("id") ON DELETE CASCADE ON UPDATE NO ACTION, CONSTRAINT "FK_review_comments_authorId" FOREIGN KEY ("authorId") REFERENCES "users" ("id") ON DELETE SET NULL ON UPDATE NO ACTION)`,
    );
    await ddl(q, `CREATE INDEX "IDX_review_comments_card" ON "review_comments" ("batchId", "statistic", "period") `);
    await ddl(q, 
      `CREATE TABLE "review_requests" ("id" integer PRIMARY KEY AUTOINCREMENT NOT NULL, "studyId" integer NOT NULL, "batchId" integer NOT NULL, "reviewerId" integer NOT NULL, "requestedById" integer, "message" text NOT NULL DEFAULT (''), "createdAt" datetime NOT NULL DEFAULT (datetime('now')), "completedAt" datetime, CONSTRAINT "FK_review_requests_study" FOREIGN KEY ("studyId") REFERENCES "studies" ("id") ON DELETE CASCADE ON UPDATE NO ACTION, CONSTRAINT "FK_review_requests_batch" FOREIGN KEY ("batchId") REFERENCES "batches" ("id") ON DELETE CASCADE ON UPDATE NO ACTION, CONSTRAINT "FK_review_requests_reviewerId" FOREIGN KEY ("reviewerId") REFERENCES "users" ("id") ON DELETE CASCADE ON UPDATE NO ACTION, CONSTRAINT "FK_review_requests_requestedById" FOREIGN KEY ("requestedById") REFERENCES "users" ("id") ON DELETE SET NULL ON UPDATE NO ACTION)`,
    );
    await ddl(q, `CREATE INDEX "IDX_review_requests_reviewer" ON "review_requests" ("reviewerId") `);
    await ddl(q, `CREATE INDEX "IDX_review_requests_batch" ON "review_requests" ("batchId") `);
    await ddl(q, 
      `CREATE TABLE "report_signoffs" ("id" integer PRIMARY KEY AUTOINCREMENT NOT NULL, "studyId" integer NOT NULL, "batchId" integer NOT NULL, "signedById" integer, "signedByName" varchar(120) NOT NULL, "note" text NOT NULL DEFAULT (''), "counts" text NOT NULL, "signedAt" datetime NOT NULL DEFAULT (datetime('now')), CONSTRAINT "FK_report_signoffs_study" FOREIGN KEY ("studyId") REFERENCES "studies" ("id") ON DELETE CASCADE ON UPDATE NO ACTION, CONSTRAINT "FK_report_signoffs_batch" FOREIGN KEY ("batchId") REFERENCES "batches" ("id") ON DELETE CASCADE ON UPDATE NO ACTION, CONSTRAINT "FK_report_signoffs_signedById" FOREIGN KEY ("signedById") REFERENCES "users" ("id") ON DELETE SET NULL ON UPDATE NO ACTION)`,
    );
    await ddl(q, `CREATE INDEX "IDX_report_signoffs_batch" ON "report_signoffs" ("batchId") `);
    await ddl(q, 
      `CREATE TABLE "notification_preferences" ("userId" integer PRIMARY KEY NOT NULL, "batchEnded" boolean NOT NULL DEFAULT (1), "reviewRequested" boolean NOT NULL DEFAULT (1), "reportSigned" boolean NOT NULL DEFAULT (1), "updatedAt" datetime NOT NULL DEFAULT (datetime('now')), CONSTRAINT "FK_notification_preferences_userId" FOREIGN KEY ("userId") REFERENCES "users" ("id") ON DELETE CASCADE ON UPDATE NO ACTION)`,
    );
    await ddl(q, 
      `CREATE TABLE "notification_events" ("id" integer PRIMARY KEY AUTOINCREMENT NOT NULL, "kind" varchar(30) NOT NULL, "studyId" integer NOT NULL, "batchId" integer, "payload" text NOT NULL, "createdAt" datetime NOT NULL DEFAULT (datetime('now')), "sentAt" datetime, "attempts" integer NOT NULL DEFAULT (0), "error" text, CONSTRAINT "FK_notification_events_study" FOREIGN KEY ("studyId") REFERENCES "studies" ("id") ON DELETE CASCADE ON UPDATE NO ACTION)`,
    );
    await ddl(q, `CREATE INDEX "IDX_notification_events_pending" ON "notification_events" ("sentAt") `);
  }

  async down(q: QueryRunner): Promise<void> {
    await ddl(q, `DROP INDEX "IDX_notification_events_pending"`);
    await ddl(q, `DROP TABLE "notification_events"`);
    await ddl(q, `DROP TABLE "notification_preferences"`);
    await ddl(q, `DROP INDEX "IDX_report_signoffs_batch"`);
    await ddl(q, `DROP TABLE "report_signoffs"`);
    await ddl(q, `DROP INDEX "IDX_review_requests_batch"`);
    await ddl(q, `DROP INDEX "IDX_review_requests_reviewer"`);
    await ddl(q, `DROP TABLE "review_requests"`);
    await ddl(q, `DROP INDEX "IDX_review_comments_card"`);
    await ddl(q, `DROP TABLE "review_comments"`);
    await ddl(q, `DROP INDEX "IDX_verdict_history_batch"`);
    await ddl(q, `DROP TABLE "verdict_history"`);
    await ddl(q, `DROP INDEX "IDX_verdicts_study"`);
    await ddl(q, `DROP TABLE "verdicts"`);
  }
}
