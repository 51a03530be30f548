/**
 * Runs the migrations on the database (WAVEFIT_DB, default data/wavefit.sqlite).
 *
 *   npm run migrate                    apply pending migrations
 *   npm run migrate -- --revert        undo the newest migration
 *   npm run migrate -- --pending-sql   print the SQL the entities need beyond all migrations
 *                                      (on a scratch in-memory database; a starting point for a new migration)
 */
import { loadConfig } from '../config';
import { createDataSource } from './dataSource';

async function main(argv: string[]): Promise<void> {
  if (argv.includes('--pending-sql')) {
    const scratch = createDataSource({ database: ':memory:' });
    await scratch.initialize();
    const log = await scratch.driver.createSchemaBuilder().log();
    console.log(log.upQueries.length ? log.upQueries.map((q) => q.query + ';').join('\n') : '-- entities and migrations agree');
    await scratch.destroy();
    return;
  }
  const config = loadConfig();
  const dataSource = createDataSource({ database: config.dbPath, postgresUrl: config.postgresUrl ?? undefined, migrationsRun: false });
  await dataSource.initialize();
  try {
    if (argv.includes('--revert')) {
      await dataSource.undoLastMigration({ transaction: 'each' });
      console.log(`Reverted the newest migration on ${config.dbPath}.`);
      return;
    }
    const applied = await dataSource.runMigrations({ transaction: 'each' });
    console.log(
      applied.length
        ? `Applied ${applied.length} migration(s) to ${config.dbPath}: ${applied.map((m) => m.name).join(', ')}`
        : `${config.dbPath} is up to date.`,
    );
  } finally {
    await dataSource.destroy();
  }
}

main(process.argv.slice(2)).catch((error) => {
  console.error(error);
  process.exit(1);
});
