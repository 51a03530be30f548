/**
 * Every migration, oldest first. The schema is built only by these (never by synchronize); they run
 * at start-up (migrationsRun) and with `npm run migrate`.
 *
 * To change the schema:
 * 1. change or add the EntitySchema in the feature's entities.ts (and list a new one in ./entities.ts);
 * 2. print the SQL TypeORM would need: `npm run migrate -- --pending-sql`;
 * 3. copy it into a new migration in the feature folder (migration.ts, or migrations/NNNN-What.ts
 *    once a folder has several), a class named What<timestamp> with up() and down(), give
 *    constraints readable names, and append the class to this list. Never rename a class or its
 *    `name`: the database records applied migrations by name.
 * 4. tests/api/schema.test.ts fails while the entities and the migrations disagree.
 */
import { Accounts1733100000001, Sessions1733100002200 } from '../auth/migration';
import { StudyData1733100000002 } from '../data/migration';
import { JobQueue1733100000500 } from '../jobs/migration';
import { BatchGof1733100002300, Batches1733100000900 } from '../batches/migration';
import { Models1733100001000 } from '../models/migration';
import { Review1733100001200 } from '../review/migration';
import { FixedPairsAndPresence1733100001300 } from '../data/migrations/0003-FixedPairsAndPresence';
import { SignoffAcknowledgement1733100001900 } from '../reports/migration';
import { Lineups1733100002000 } from '../lineups/migration';
import { Refits1733100002400 } from '../refits/migration';

export const migrations = [
  Accounts1733100000001,
  StudyData1733100000002,
  JobQueue1733100000500,
  Batches1733100000900,
  Models1733100001000,
  Review1733100001200,
  FixedPairsAndPresence1733100001300,
  SignoffAcknowledgement1733100001900,
  Lineups1733100002000,
  Sessions1733100002200,
  BatchGof1733100002300,
  Refits1733100002400,
];
