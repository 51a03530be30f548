/**
 * Migration 3: structural zeros and ones (`waves.fixed`, n*n bytes) and changing composition
 * (`waves.present`, n bytes) per wave; both null for studies that use neither.
 */
import type { MigrationInterface, QueryRunner } from 'typeorm';
import { ddl } from '../../db/migrations/ddl';

export class FixedPairsAndPresence1733100001300 implements MigrationInterface {
  name = 'FixedPairsAndPresence1733100001300';

  async up(q: QueryRunner): Promise<void> {
    await ddl(q, `ALTER TABLE "waves" ADD COLUMN "fixed" blob`);
    await ddl(q, `ALTER TABLE "waves" ADD COLUMN "present" blob`);
  }

  async down(q: QueryRunner): Promise<void> {
    await ddl(q, `ALTER TABLE "waves" DROP COLUMN "present"`);
    await ddl(q, `ALTER TABLE "waves" DROP COLUMN "fixed"`);
  }
}
