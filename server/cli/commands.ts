/**
 * Command line for users who script: auxiliary statistics of a network file, and simulated chains from a
 * JSON specification. Output is JSON on stdout; errors are one clear line on stderr with a non-zero code.
 *
 *   stats FILE [--format edgelist|matrix] [--missing MARKER] [--max-degree K] [--max-distance K]
 *   simulate SPEC.json
 *
 * `runCli` is separate from the process entry (main.ts) so tests can call it in-process.
 */
import { readFileSync } from 'node:fs';
import { z } from 'zod';
import { DATA_FORMATS, type DataFormat, type DataProblem } from '../../shared/data';
import { EFFECT_IDS } from '../../shared/effects';
import { readCsv } from '../data/csv';
import { parseNetworkFile, TIE_MISSING } from '../data/parse';
import { buildEffects, type CovariateValues } from '../engine/effects';
import { streamFor } from '../engine/prng';
import { simulatePeriod, targetStatistics } from '../engine/simulate';
import { NetworkState, NO_CACHES } from '../engine/state';
import { allAuxStatistics, type AuxOptions, type AuxValues } from '../engine/statistics';

export const USAGE = `usage:
  npm run cli -- stats FILE [--format edgelist|matrix] [--missing MARKER] [--max-degree K] [--max-distance K]
      FILE: one wave in the upload's format (the same reader and rules as an upload): an edge list
      (sender,receiver; header optional) or a square 0/1 matrix with actor labels in the first row
      and column. Without --format, a file whose first cell is empty or whose first line has more
      than three fields is read as a matrix, any other as an edge list. Prints the auxiliary
      statistics as JSON; a network with missing pairs is refused.
  npm run cli -- simulate SPEC.json
      Runs chains of one period from a JSON specification and prints each chain's end-network
      statistics as JSON. Fields: actors, start (list of [sender, receiver]), covariates (optional),
      effects ([{id, covariate?, parameter}]), rate, chains (default 1), seed, statistics (optional
      {maxDegree, maxDistance}).`;

export interface CliIO {
  stdout: (text: string) => void;
  stderr: (text: string) => void;
  readFile: (path: string) => string;
}

const defaultIO: CliIO = {
  stdout: (t) => process.stdout.write(t),
  stderr: (t) => process.stderr.write(t),
  readFile: (p) => readFileSync(p, 'utf8'),
};

class CliError extends Error {}

const positiveInt = z.number().int().min(0);

const statisticsOptions = z
  .object({ maxDegree: positiveInt.optional(), maxDistance: z.number().int().min(1).optional() })
  .strict();

const covariateSchema = z.discriminatedUnion('type', [
  z.object({ type: z.literal('numeric'), values: z.array(z.number().finite().nullable()) }).strict(),
  z.object({ type: z.literal('categorical'), values: z.array(z.union([z.string(), z.number()]).nullable()) }).strict(),
]);

const tieSchema = z.union([
  z.tuple([z.string(), z.string()]),
  z.object({ sender: z.string(), receiver: z.string() }).strict(),
]);

export const simulationSpecSchema = z
  .object({
    actors: z.array(z.string().min(1)).min(2, 'at least two actors are needed'),
    start: z.array(tieSchema).default([]),
    covariates: z.record(z.string(), covariateSchema).default({}),
    effects: z
      .array(
        z
          .object({
            id: z.enum(EFFECT_IDS),
            covariate: z.string().optional(),
            parameter: z.number().finite(),
          })
          .strict(),
      )
      .min(1, 'at least one effect is needed'),
    rate: z.number().finite().min(0),
    chains: z.number().int().min(1).max(100000).default(1),
    seed: z.number().int().refine(Number.isSafeInteger, 'seed must be a safe integer'),
    statistics: statisticsOptions.default({}),
  })
  .strict();

export type SimulationSpec = z.infer<typeof simulationSpecSchema>;

function vectors(stats: Record<string, AuxValues>): Record<string, { labels: string[]; values: number[] }> {
  const out: Record<string, { labels: string[]; values: number[] }> = {};
  for (const [id, v] of Object.entries(stats)) out[id] = { labels: v.labels, values: Array.from(v.values) };
  return out;
}

function parseIntFlag(args: string[], k: number, flag: string): number {
  const v = args[k + 1];
  if (v === undefined || !/^\d+$/.test(v)) throw new CliError(`${flag} needs a whole number, got ${v === undefined ? 'nothing' : `"${v}"`}`);
  return Number(v);
}

function readInput(io: CliIO, file: string): string {
  try {
    return io.readFile(file);
  } catch (e) {
    throw new CliError(`cannot read ${file}: ${(e as Error).message}`);
  }
}

/** The format of a network file when the user does not say: a matrix starts with an empty corner cell or has more than three columns. */
export function detectFormat(content: string): DataFormat {
  const first = readCsv(content).rows[0]?.fields ?? [];
  return first[0] === '' || first.length > 3 ? 'matrix' : 'edgelist';
}

function describeProblem(file: string, p: DataProblem): string {
  const place = [p.line !== undefined ? `line ${p.line}` : '', p.column !== undefined ? `column ${p.column}` : ''].filter(Boolean).join(', ');
  return `${file}${place ? ` ${place}` : ''}: ${p.message}`;
}

function statsCommand(args: string[], io: CliIO): void {
  let file: string | undefined;
  let format: DataFormat | undefined;
  let missingMarker = 'NA';
  const options: AuxOptions = {};
  for (let k = 0; k < args.length; k++) {
    const a = args[k];
    if (a === '--max-degree') options.maxDegree = parseIntFlag(args, k++, a);
    else if (a === '--max-distance') {
      options.maxDistance = parseIntFlag(args, k++, a);
      if (options.maxDistance < 1) throw new CliError('--max-distance must be at least 1');
    } else if (a === '--format') {
      const v = args[++k];
      if (!(DATA_FORMATS as readonly string[]).includes(v)) throw new CliError(`--format is ${DATA_FORMATS.join(' or ')}, got ${v === undefined ? 'nothing' : `"${v}"`}`);
      format = v as DataFormat;
    } else if (a === '--missing') {
      const v = args[++k];
      if (!v) throw new CliError('--missing needs the marker of a missing value (e.g. NA)');
      missingMarker = v;
    } else if (a.startsWith('--')) throw new CliError(`unknown option ${a}`);
    else if (file === undefined) file = a;
    else throw new CliError(`stats takes one file, got also "${a}"`);
  }
  if (file === undefined) throw new CliError('stats needs a network file');
  const content = readInput(io, file);
  const used = format ?? detectFormat(content);
  const parsed = parseNetworkFile(file, content, used, missingMarker);
  if (!parsed.ok) {
    const [first, ...more] = parsed.details.problems;
    throw new CliError(describeProblem(file, first) + (more.length ? ` (and ${more.length}${parsed.details.truncated ? '+' : ''} more problems)` : ''));
  }
  const { actors, adjacency } = parsed.network;
  const n = actors.length;
  const missing = adjacency.reduce((count, v) => count + (v === TIE_MISSING ? 1 : 0), 0);
  if (missing > 0) {
    throw new CliError(
      `${file}: ${missing} pair${missing === 1 ? ' is' : 's are'} missing ("${missingMarker}"); the command line computes statistics of complete networks only`,
    );
  }
  const state = NetworkState.fromAdjacency(n, adjacency, NO_CACHES);
  const result = {
    file,
    format: used,
    n,
    actors,
    ties: state.ties,
    statistics: vectors(allAuxStatistics(state, options)),
  };
  io.stdout(JSON.stringify(result, null, 2) + '\n');
}

function formatZodError(error: z.ZodError): string {
  return error.issues
    .slice(0, 5)
    .map((i) => `${i.path.length ? i.path.join('.') : '(spec)'}: ${i.message}`)
    .join('; ');
}

/** Run a validated specification; throws Error with a clear message on inconsistent content. */
export function runSimulationSpec(spec: SimulationSpec): object {
  const n = spec.actors.length;
  const index = new Map<string, number>();
  spec.actors.forEach((a, k) => {
    if (index.has(a)) throw new CliError(`actor "${a}" is listed twice`);
    index.set(a, k);
  });
  const actor = (label: string, where: string) => {
    const k = index.get(label);
    if (k === undefined) throw new CliError(`${where}: "${label}" is not among the actors`);
    return k;
  };
  const adj = new Uint8Array(n * n);
  spec.start.forEach((t, k) => {
    const [s, r] = Array.isArray(t) ? t : [t.sender, t.receiver];
    const i = actor(s, `start tie ${k + 1}`);
    const j = actor(r, `start tie ${k + 1}`);
    if (i === j) throw new CliError(`start tie ${k + 1}: self-tie "${s}" -> "${r}"`);
    adj[i * n + j] = 1;
  });
  const covariates: Record<string, CovariateValues> = {};
  for (const [name, cov] of Object.entries(spec.covariates)) {
    if (cov.values.length !== n) {
      throw new CliError(`covariate "${name}" has ${cov.values.length} values for ${n} actors`);
    }
    if (cov.type === 'numeric') {
      covariates[name] = Float64Array.from(cov.values, (v) => (v === null ? Number.NaN : v));
    } else {
      const codes = new Map<string, number>();
      covariates[name] = Int32Array.from(cov.values, (v) => {
        if (v === null) return -1;
        const key = String(v);
        if (!codes.has(key)) codes.set(key, codes.size);
        return codes.get(key)!;
      });
    }
  }
  const effects = buildEffects(
    spec.effects.map((e) => (e.covariate === undefined ? { id: e.id } : { id: e.id, covariate: e.covariate })),
    covariates,
  );
  const params = Float64Array.from(spec.effects, (e) => e.parameter);
  const start = NetworkState.fromAdjacency(n, adj, NO_CACHES);
  const chains = [];
  for (let c = 0; c < spec.chains; c++) {
    const res = simulatePeriod({ start, rate: spec.rate, effects, params, rng: streamFor(spec.seed, c) });
    const targets: Record<string, number> = {};
    targetStatistics(res.end, effects).forEach((v, k) => (targets[effects[k].key] = v));
    chains.push({
      chain: c + 1,
      ministeps: res.ministeps,
      changes: res.changes,
      ties: res.end.ties,
      targets,
      statistics: vectors(allAuxStatistics(res.end, spec.statistics)),
    });
  }
  return { actors: n, seed: spec.seed, rate: spec.rate, chains };
}

function simulateCommand(args: string[], io: CliIO): void {
  if (args.length !== 1) throw new CliError('simulate takes exactly one specification file');
  const text = readInput(io, args[0]);
  let raw: unknown;
  try {
    raw = JSON.parse(text);
  } catch (e) {
    throw new CliError(`${args[0]} is not valid JSON (${(e as Error).message})`);
  }
  const parsed = simulationSpecSchema.safeParse(raw);
  if (!parsed.success) throw new CliError(`invalid specification: ${formatZodError(parsed.error)}`);
  io.stdout(JSON.stringify(runSimulationSpec(parsed.data), null, 2) + '\n');
}

/** Run the command line; returns the exit code (0 success, 1 bad input, 2 usage). */
export function runCli(args: string[], io: CliIO = defaultIO): number {
  const [command, ...rest] = args;
  try {
    if (command === 'stats') statsCommand(rest, io);
    else if (command === 'simulate') simulateCommand(rest, io);
    else if (command === undefined || command === 'help' || command === '--help') {
      io.stdout(USAGE + '\n');
      return command === undefined ? 2 : 0;
    } else {
      io.stderr(`wavefit cli: unknown command "${command}"\n${USAGE}\n`);
      return 2;
    }
    return 0;
  } catch (e) {
    const msg = e instanceof Error ? e.message : String(e);
    io.stderr(`wavefit cli: error: ${msg}\n`);
    return 1;
  }
}
