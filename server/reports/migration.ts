/**
 * Migration: a sign-off may carry an acknowledgement (report_signoffs.acknowledgement, JSON of
 * SignoffAcknowledgement: the concerns acknowledged and the lead's reason), required when the fit
 * did not converge or the batch ran few chains. Listed in server/db/migrations.ts after the review board.
 */
import type { MigrationInterface, QueryRunner } from 'typeorm';
import { ddl } from '../db/migrations/ddl';

export class SignoffAcknowledgement1733100001900 implements MigrationInterface {
  name = 'SignoffAcknowledgement1733100001900';

  async up(q: QueryRunner): Promise<void> {
    await ddl(q, `ALTER TABLE "report_signoffs" ADD COLUMN "acknowledgement" text`);
  }

  async down(q: QueryRunner): Promise<void> {
    await ddl(q, `ALTER TABLE "report_signoffs" DROP COLUMN "acknowledgement"`);
  }
}
