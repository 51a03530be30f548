/**
 * The TypeORM data source over better-sqlite3: WAL journal, foreign keys on, schema built only
 * by the migrations in ./migrations (never synchronize).
 */
import { mkdirSync } from 'node:fs';
import { dirname, resolve } from 'node:path';
import { DataSource } from 'typeorm';
import { entities } from './entities';
import { migrations } from './migrations';

export interface DataSourceOptions {
  /** SQLite file path or ':memory:'. */
  database: string;
  /** Run pending migrations while initialising (default true). */
  migrationsRun?: boolean;
  /** Log SQL to the console. */
  logging?: boolean;
}

/** Builds (does not open) the data source. */
export function createDataSource(options: DataSourceOptions): DataSource {
  const inMemory = options.database === ':memory:';
  if (!inMemory) mkdirSync(dirname(resolve(options.database)), { recursive: true });
  return new DataSource({
    type: 'better-sqlite3',
    database: options.database,
    // WAL needs a file; an in-memory database keeps its own journal.
    enableWAL: !inMemory,
    // The driver turns foreign keys on itself; saying it again here keeps it true if that ever changes.
    prepareDatabase: (db: { pragma: (sql: string) => unknown }) => {
      db.pragma('foreign_keys = ON');
    },
    entities,
    migrations,
    migrationsRun: options.migrationsRun ?? true,
    migrationsTransactionMode: 'each',
    synchronize: false,
    logging: options.logging ?? false,
  });
}

/** Builds, opens and migrates the data source. */
export async function openDataSource(options: DataSourceOptions): Promise<DataSource> {
  const dataSource = createDataSource(options);
  await dataSource.initialize();
  return dataSource;
}
