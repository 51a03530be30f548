/**
 * Migration 1: accounts and studies — users, studies, memberships (role per user and study) and
 * invitations (only the token's hash is kept).
 *
 * The first migration creates the tables of four folders at once (auth, studies, team, invitations);
 * it stays whole, under its recorded name, so that existing databases upgrade. Listed in
 * server/db/migrations.ts.
 */
import type { MigrationInterface, QueryRunner } from 'typeorm';
import { ddl } from '../db/migrations/ddl';

export class Accounts1733100000001 implements MigrationInterface {
  name = 'Accounts1733100000001';

  async up(q: QueryRunner): Promise<void> {
    await ddl(q, 
      `CREATE TABLE "users" ("id" integer PRIMARY KEY AUTOINCREMENT NOT NULL, "email" varchar(320) NOT NULL, "name" varchar(120) NOT NULL, "passwordHash" varchar(255) NOT NULL, "isAdmin" boolean NOT NULL DEFAULT (0), "createdAt" datetime NOT NULL DEFAULT (datetime('now')), CONSTRAINT "UQ_users_email" UNIQUE ("email"))`,
    );
    await ddl(q, 
      `CREATE TABLE "studies" ("id" integer PRIMARY KEY AUTOINCREMENT NOT NULL, "name" varchar(120) NOT NULL, "description" text NOT NULL DEFAULT (''), "createdAt" datetime NOT NULL DEFAULT (datetime('now')), "updatedAt" datetime NOT NULL DEFAULT (datetime('now')))`,
    );
    await ddl(q, 
      `CREATE TABLE "memberships" ("id" integer PRIMARY KEY AUTOINCREMENT NOT NULL, "userId" integer NOT NULL, "studyId" integer NOT NULL, "role" varchar(20) NOT NULL, "createdAt" datetime NOT NULL DEFAULT (datetime('now')), CONSTRAINT "UQ_memberships_user_study" UNIQUE ("userId", "studyId"), CONSTRAINT "FK_memberships_user" FOREIGN KEY ("userId") REFERENCES "users" ("id") ON DELETE CASCADE ON UPDATE NO ACTION, CONSTRAINT "FK_memberships_study" FOREIGN KEY ("studyId") REFERENCES "studies" ("id") ON DELETE CASCADE ON UPDATE NO ACTION)`,
    );
    await ddl(q, `CREATE INDEX "IDX_memberships_study" ON "memberships" ("studyId")`);
    await ddl(q, 
      `CREATE TABLE "invitations" ("id" integer PRIMARY KEY AUTOINCREMENT NOT NULL, "email" varchar(320) NOT NULL, "studyId" integer NOT NULL, "role" varchar(20) NOT NULL, "tokenHash" varchar(64) NOT NULL, "invitedById" integer, "createdAt" datetime NOT NULL DEFAULT (datetime('now')), "expiresAt" datetime NOT NULL, "acceptedAt" datetime, CONSTRAINT "UQ_invitations_token" UNIQUE ("tokenHash"), CONSTRAINT "FK_invitations_study" FOREIGN KEY ("studyId") REFERENCES "studies" ("id") ON DELETE CASCADE ON UPDATE NO ACTION, CONSTRAINT "FK_invitations_invited_by" FOREIGN KEY ("invitedById") REFERENCES "users" ("id") ON DELETE SET NULL ON UPDATE NO ACTION)`,
    );
    await ddl(q, `CREATE INDEX "IDX_invitations_study" ON "invitations" ("studyId")`);
  }

  async down(q: QueryRunner): Promise<void> {
    await ddl(q, `DROP INDEX "IDX_invitations_study"`);
    await ddl(q, `DROP TABLE "invitations"`);
    await ddl(q, `DROP INDEX "IDX_memberships_study"`);
    await ddl(q, `DROP TABLE "memberships"`);
    await ddl(q, `DROP TABLE "studies"`);
    await ddl(q, `DROP TABLE "users"`);
  }
}

/**
 * Migration: revocable sessions. users.sessionEpoch (tokens of an older epoch are refused) and
 * ended_sessions (the ids of signed-out tokens until they expire). Listed in
 * server/db/migrations.ts after the review board.
 *
 * The column is added with ALTER TABLE rather than by rebuilding "users": dropping that table with
 * foreign keys on would delete every membership and verdict author through the cascades.
 */
export class Sessions1733100002200 implements MigrationInterface {
  name = 'Sessions1733100002200';

  async up(q: QueryRunner): Promise<void> {
    await ddl(q, `ALTER TABLE "users" ADD COLUMN "sessionEpoch" integer NOT NULL DEFAULT (0)`);
    await ddl(q, 
      `CREATE TABLE "ended_sessions" ("tokenId" varchar(32) PRIMARY KEY NOT NULL, "userId" integer NOT NULL, "expiresAt" datetime NOT NULL, CONSTRAINT "FK_ended_sessions_user" FOREIGN KEY ("userId") REFERENCES "users" ("id") ON DELETE CASCADE ON UPDATE NO ACTION)`,
    );
    await ddl(q, `CREATE INDEX "IDX_ended_sessions_expires" ON "ended_sessions" ("expiresAt") `);
  }

  async down(q: QueryRunner): Promise<void> {
    await ddl(q, `DROP INDEX "IDX_ended_sessions_expires"`);
    await ddl(q, `DROP TABLE "ended_sessions"`);
    await ddl(q, `ALTER TABLE "users" DROP COLUMN "sessionEpoch"`);
  }
}
