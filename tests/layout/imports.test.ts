/**
 * The one-way import rule of the server (DEVELOPERS.md, "Server map"). Every import between project
 * files is read with the TypeScript compiler's own import scanner (ts.preProcessFile: static imports,
 * type-only imports, re-exports and dynamic import()), resolved to a file, and checked:
 *
 * 1. Layers, lowest first: engine < schema < base < service < routes < root. A module imports its own
 *    layer or a lower one, never a higher one.
 *      engine   server/engine/**: pure computation
 *      schema   entities.ts, migration.ts, migrations/* of any folder: tables and their migrations
 *      base     config, errors, mail/, jobs/ (the queue), db/ helpers: used by every feature
 *      service  every other file of a feature folder (services, job kinds, workers, parsers)
 *      routes   routes.ts of any folder, and server/deps.ts (what routers are built from)
 *      root     app.ts, main.ts, cli/, demo/, and db/ dataSource, entities, migrations, migrate, seed:
 *               the places that put everything together
 * 2. Within one layer, features import only features listed before them in FEATURE_ORDER (a review
 *    service may use a batch service, never the reverse).
 * 3. The client (app/, features/) never imports server/; shared/ imports only shared/.
 *
 * Common practice (layered architecture with an acyclic dependency rule); the checker is ours.
 */
import { existsSync, readdirSync, readFileSync, statSync } from 'node:fs';
import { dirname, join, relative, resolve } from 'node:path';
import ts from 'typescript';
import { describe, expect, it } from 'vitest';

const ROOT = resolve(__dirname, '../..');

export const LAYERS = ['engine', 'schema', 'base', 'service', 'routes', 'root'] as const;
export type Layer = (typeof LAYERS)[number];

/** Lowest first. Within a layer a feature may import only the features before it. */
export const FEATURE_ORDER = ['notify', 'auth', 'studies', 'team', 'invitations', 'data', 'models', 'batches', 'review', 'lineups', 'refits', 'reports', 'explore'];

const ROOT_DB_FILES = new Set(['dataSource.ts', 'entities.ts', 'migrations.ts', 'migrate.ts', 'seed.ts']);
const BASE_FOLDERS = new Set(['mail', 'jobs', 'db']);
const ROOT_FOLDERS = new Set(['cli', 'demo']);

export interface Place {
  layer: Layer;
  /** The top folder below server/ ('' for files directly in server/). */
  folder: string;
}

/** Layer and folder of a server file, by its path relative to the project (forward slashes). */
export function placeOf(file: string): Place {
  const parts = file.split('/');
  if (parts[0] !== 'server') throw new Error(`layout: ${file} is not a server file`);
  const name = parts[parts.length - 1];
  const folder = parts.length > 2 ? parts[1] : '';
  if (folder === 'engine') return { layer: 'engine', folder };
  if (folder === '') {
    if (name === 'app.ts' || name === 'main.ts') return { layer: 'root', folder };
    if (name === 'deps.ts') return { layer: 'routes', folder };
    return { layer: 'base', folder };
  }
  if (folder === 'db' && parts.length === 3 && ROOT_DB_FILES.has(name)) return { layer: 'root', folder };
  if (ROOT_FOLDERS.has(folder)) return { layer: 'root', folder };
  if (/^(entities|migration)\.ts$/.test(name) || parts.includes('migrations') || parts.includes('entities')) {
    return { layer: 'schema', folder };
  }
  if (name === 'routes.ts') return { layer: 'routes', folder };
  if (BASE_FOLDERS.has(folder)) return { layer: 'base', folder };
  return { layer: 'service', folder };
}

function walk(dir: string, out: string[] = []): string[] {
  for (const entry of readdirSync(dir)) {
    const path = join(dir, entry);
    if (statSync(path).isDirectory()) walk(path, out);
    else if (/\.(ts|tsx|mts|mjs)$/.test(entry) && !/\.test\.ts$/.test(entry)) out.push(path);
  }
  return out;
}

const EXTENSIONS = ['', '.ts', '.tsx', '.mts', '.mjs', '.js', '.json', '/index.ts', '/index.tsx'];

function resolveImport(fromFile: string, spec: string): string | null {
  if (!spec.startsWith('.')) return null; // a package
  const base = resolve(dirname(fromFile), spec);
  for (const ext of EXTENSIONS) {
    const candidate = base + ext;
    if (existsSync(candidate) && statSync(candidate).isFile()) return candidate;
  }
  throw new Error(`layout: ${relative(ROOT, fromFile)} imports ${spec}, which resolves to no file`);
}

export interface ImportEdge {
  from: string;
  to: string;
}

/** Every import between project files under the given top folders (paths relative to the project). */
export function projectImports(folders: string[], root = ROOT): ImportEdge[] {
  const edges: ImportEdge[] = [];
  for (const folder of folders) {
    for (const file of walk(join(root, folder))) {
      const info = ts.preProcessFile(readFileSync(file, 'utf8'), true, true);
      for (const imported of info.importedFiles) {
        const target = resolveImport(file, imported.fileName);
        if (target) edges.push({ from: relative(root, file).split('\\').join('/'), to: relative(root, target).split('\\').join('/') });
      }
    }
  }
  return edges;
}

function featureRank(folder: string): number {
  return FEATURE_ORDER.indexOf(folder); // -1 for folders that are not features: lowest
}

/** What is wrong with one import between server files, or null when it follows the rule. */
export function serverImportProblem(edge: ImportEdge): string | null {
  const from = placeOf(edge.from);
  const to = placeOf(edge.to);
  const a = LAYERS.indexOf(from.layer);
  const b = LAYERS.indexOf(to.layer);
  if (b > a) return `${edge.from} (${from.layer}) imports ${edge.to} (${to.layer}): a lower layer imports a higher one`;
  if (a === b && from.folder !== to.folder && featureRank(to.folder) > featureRank(from.folder)) {
    return `${edge.from} (${from.layer} of ${from.folder || 'server'}) imports ${edge.to} (${to.layer} of ${to.folder}): ` +
      `${to.folder} comes after ${from.folder || 'server'} in FEATURE_ORDER`;
  }
  return null;
}

/** Every break of the rule in the project as it is on disk. */
export function layoutProblems(root = ROOT): string[] {
  const problems: string[] = [];
  for (const edge of projectImports(['server', 'shared', 'features', 'app'], root)) {
    const fromTop = edge.from.split('/')[0];
    const toTop = edge.to.split('/')[0];
    if (fromTop === 'server' && toTop === 'server') {
      const problem = serverImportProblem(edge);
      if (problem) problems.push(problem);
    } else if ((fromTop === 'features' || fromTop === 'app') && toTop === 'server') {
      problems.push(`${edge.from} imports ${edge.to}: the client never imports the server`);
    } else if (fromTop === 'shared' && toTop !== 'shared') {
      problems.push(`${edge.from} imports ${edge.to}: shared/ imports only shared/`);
    }
  }
  return problems;
}

describe('server layout: imports run one way', () => {
  it('finds the imports it checks (the scanner works)', () => {
    const edges = projectImports(['server']);
    expect(edges.length).toBeGreaterThan(200);
    expect(edges).toContainEqual({ from: 'server/app.ts', to: 'server/auth/routes.ts' });
    // a type-only import counts too
    expect(edges).toContainEqual({ from: 'server/auth/context.ts', to: 'server/studies/entities.ts' });
  });

  it('classifies files into layers', () => {
    expect(placeOf('server/engine/gof/mahalanobis.ts').layer).toBe('engine');
    expect(placeOf('server/batches/entities.ts').layer).toBe('schema');
    expect(placeOf('server/auth/migration.ts').layer).toBe('schema');
    expect(placeOf('server/jobs/queue.ts').layer).toBe('base');
    expect(placeOf('server/errors.ts').layer).toBe('base');
    expect(placeOf('server/review/service.ts')).toEqual({ layer: 'service', folder: 'review' });
    expect(placeOf('server/review/routes.ts').layer).toBe('routes');
    expect(placeOf('server/db/dataSource.ts').layer).toBe('root');
    expect(placeOf('server/app.ts').layer).toBe('root');
  });

  it('flags an upward import and a backward feature import', () => {
    expect(serverImportProblem({ from: 'server/data/store.ts', to: 'server/batches/routes.ts' })).toMatch(/lower layer imports a higher/);
    expect(serverImportProblem({ from: 'server/engine/simulate.ts', to: 'server/data/store.ts' })).toMatch(/lower layer/);
    expect(serverImportProblem({ from: 'server/data/store.ts', to: 'server/batches/service.ts' })).toMatch(/comes after data/);
    expect(serverImportProblem({ from: 'server/batches/service.ts', to: 'server/data/store.ts' })).toBeNull();
    expect(serverImportProblem({ from: 'server/batches/routes.ts', to: 'server/models/service.ts' })).toBeNull();
  });

  it('no module of the project breaks the rule', () => {
    expect(layoutProblems()).toEqual([]);
  });
});
