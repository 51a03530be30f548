/**
 * Migration 2: study data — actors, waves (adjacency as n*n bytes: 0, 1, 2 = missing) and actor
 * covariates (values as JSON). All belong to a study and go with it. Listed in server/db/migrations.ts.
 */
import type { MigrationInterface, QueryRunner } from 'typeorm';
import { ddl } from '../db/migrations/ddl';

export class StudyData1733100000002 implements MigrationInterface {
  name = 'StudyData1733100000002';

  async up(q: QueryRunner): Promise<void> {
    await ddl(q, 
      `CREATE TABLE "actors" ("id" integer PRIMARY KEY AUTOINCREMENT NOT NULL, "studyId" integer NOT NULL, "index" integer NOT NULL, "label" varchar(60) NOT NULL, CONSTRAINT "UQ_actors_study_index" UNIQUE ("studyId", "index"), CONSTRAINT "UQ_actors_study_label" UNIQUE ("studyId", "label"), CONSTRAINT "FK_actors_study" FOREIGN KEY ("studyId") REFERENCES "studies" ("id") ON DELETE CASCADE ON UPDATE NO ACTION)`,
    );
    await ddl(q, 
      `CREATE TABLE "waves" ("id" integer PRIMARY KEY AUTOINCREMENT NOT NULL, "studyId" integer NOT NULL, "index" integer NOT NULL, "label" varchar(60) NOT NULL, "actorCount" integer NOT NULL, "adjacency" blob NOT NULL, "sourceFormat" varchar(20) NOT NULL, "createdAt" datetime NOT NULL DEFAULT (datetime('now')), CONSTRAINT "UQ_waves_study_index" UNIQUE ("studyId", "index"), CONSTRAINT "FK_waves_study" FOREIGN KEY ("studyId") REFERENCES "studies" ("id") ON DELETE CASCADE ON UPDATE NO ACTION)`,
    );
    await ddl(q, 
      `CREATE TABLE "covariates" ("id" integer PRIMARY KEY AUTOINCREMENT NOT NULL, "studyId" integer NOT NULL, "name" varchar(60) NOT NULL, "kind" varchar(20) NOT NULL, "changing" boolean NOT NULL DEFAULT (0), "values" text NOT NULL, "categories" text NOT NULL, CONSTRAINT "UQ_covariates_study_name" UNIQUE ("studyId", "name"), CONSTRAINT "FK_covariates_study" FOREIGN KEY ("studyId") REFERENCES "studies" ("id") ON DELETE CASCADE ON UPDATE NO ACTION)`,
    );
  }

  async down(q: QueryRunner): Promise<void> {
    await ddl(q, `DROP TABLE "covariates"`);
    await ddl(q, `DROP TABLE "waves"`);
    await ddl(q, `DROP TABLE "actors"`);
  }
}
