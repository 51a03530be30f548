/**
 * Migration: revocable sessions. users.sessionEpoch (tokens of an older epoch are refused) and
 * ended_sessions (the ids of signed-out tokens until they expire). Listed in
 * server/db/migrations/index.ts after the review board.
 *
 * The column is added with ALTER TABLE rather than by rebuilding "users": dropping that table with
 * foreign keys on would delete every membership and verdict author through the cascades.
 */
import type { MigrationInterface, QueryRunner } from 'typeorm';

export class Sessions1733100001300 implements MigrationInterface {
  name = 'Sessions1733100001300';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`ALTER TABLE "users" ADD COLUMN "sessionEpoch" integer NOT NULL DEFAULT (0)`);
    await q.query(
      `CREATE TABLE "ended_sessions" ("tokenId" varchar(32) PRIMARY KEY NOT NULL, "userId" integer NOT NULL, "expiresAt" datetime NOT NULL, CONSTRAINT "FK_ended_sessions_user" FOREIGN KEY ("userId") REFERENCES "users" ("id") ON DELETE CASCADE ON UPDATE NO ACTION)`,
    );
    await q.query(`CREATE INDEX "IDX_ended_sessions_expires" ON "ended_sessions" ("expiresAt") `);
  }

  async down(q: QueryRunner): Promise<void> {
    await q.query(`DROP INDEX "IDX_ended_sessions_expires"`);
    await q.query(`DROP TABLE "ended_sessions"`);
    await q.query(`ALTER TABLE "users" DROP COLUMN "sessionEpoch"`);
  }
}
