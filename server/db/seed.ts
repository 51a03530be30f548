/**
 * `npm run seed`: the demo seed (server/demo/seed.ts) on the database of WAVEFIT_DB (default
 * data/wavefit.sqlite), with the demo results for the review board.
 */
import { loadConfig } from '../config';
import { describeSeed, seedDemo } from '../demo/seed';
import { stopJobQueue } from '../jobs';
import { openDataSource } from './dataSource';

async function main(): Promise<void> {
  const config = loadConfig();
  const dataSource = await openDataSource({ database: config.dbPath, postgresUrl: config.postgresUrl ?? undefined });
  try {
    const result = await seedDemo(dataSource, { passwordHash: config.passwordHash, withResults: !config.postgresUrl });
    console.log(`Database: ${config.dbPath}`);
    console.log(describeSeed(result));
  } finally {
    await stopJobQueue(dataSource);
    await dataSource.destroy();
  }
}

main().catch((error) => {
  console.error(error);
  process.exit(1);
});
