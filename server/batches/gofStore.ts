/**
 * The goodness of fit of finished batches, computed once and kept, with the heavy work off the
 * thread that answers requests.
 *
 * - When a batch finishes, every period's GOF at the default coverages is computed in a worker
 *   thread and stored in batch_gof (jobKind.ts -> gofHooks.ts -> warm).
 * - A read finds it there (one small JSON row per period). A batch finished before this store existed
 *   is computed on its first read, in the worker, and stored.
 * - Other coverages (a person's choice on the batch screen) are computed in the worker at most once
 *   each and kept in memory (the most recent 64), not stored.
 * - Simultaneous reads of the same thing share one computation; the worker takes one at a time, so
 *   fifty readers queue in the worker instead of blocking /health.
 * The board and the report (server/review/gofData.ts) read the same stored rows through `stored`.
 */
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { Worker } from 'node:worker_threads';
import type { DataSource } from 'typeorm';
import { DEFAULT_COVERAGES } from '../../shared/batches';
import { syncDb } from '../jobs';
import { MATRICES_KEPT, computePeriodGof, type GofBatch, type StatisticGof } from './gofCompute';
import { onBatchDone } from './gofHooks';
import type { GofWorkerReply, GofWorkerRequest } from './gofWorker';
import type { ApiErrorCode } from '../../shared/api';
import { ApiError } from '../errors';
import { periodMatrix } from './gof';
import { getBatch, type LoadedBatch } from './service';

export type { StatisticGof } from './gofCompute';

const DEFAULT_KEY = DEFAULT_COVERAGES.join(',');
const MEMORY_LIMIT = 64;

const coverageKey = (coverages: readonly number[]) => coverages.map(String).join(',');

// JSON has no NaN or Infinity; the stored rows keep them as tagged strings so a read gives back
// exactly what was computed.
const NON_FINITE = '\u0000number:';
const toJson = (value: unknown) =>
  JSON.stringify(value, (_k, v: unknown) => (typeof v === 'number' && !Number.isFinite(v) ? NON_FINITE + String(v) : v));
const fromJson = <T>(text: string): T =>
  JSON.parse(text, (_k, v: unknown) => (typeof v === 'string' && v.startsWith(NON_FINITE) ? Number(v.slice(NON_FINITE.length)) : v)) as T;

// ---------------------------------------------------------------- the worker (one per process)

let worker: Worker | null = null;
let nextId = 1;
const pending = new Map<number, { resolve: (r: StatisticGof[]) => void; reject: (e: Error) => void; resend: () => void }>();
/** Which matrices the worker holds, in its order (the same rule of eviction as gofWorker.ts). */
const workerHolds = new Map<string, true>();

function gofWorker(): Worker {
  if (worker) return worker;
  const w = new Worker(join(__dirname, '../jobs/boot.mjs'), {
    execArgv: [],
    workerData: { entry: pathToFileURL(join(__dirname, 'gofWorker.ts')).href },
  });
  w.unref(); // never keeps the process alive
  w.on('message', (reply: GofWorkerReply) => {
    const p = pending.get(reply.id);
    if (!p) return;
    pending.delete(reply.id);
    if (!reply.ok && reply.needMatrix) return p.resend();
    if (reply.ok) p.resolve(reply.results);
    // A refusal (e.g. fewer than two chains) keeps its status; anything else is a server fault.
    else p.reject(reply.status && reply.code ? new ApiError(reply.status, reply.code as ApiErrorCode, reply.message) : new Error(`gof worker: ${reply.message}`));
  });
  const fail = (error: Error) => {
    for (const p of pending.values()) p.reject(error);
    pending.clear();
    workerHolds.clear();
    worker = null;
  };
  w.on('error', fail);
  w.on('exit', (code) => fail(new Error(`gof worker: stopped (exit code ${code})`)));
  worker = w;
  return w;
}

/**
 * Computes in the worker. The stored rows of the period are read here (readMatrix) only when the
 * worker does not hold them yet; they are handed over, not copied.
 */
function inWorker(storeId: number, batch: LoadedBatch, readMatrix: () => ReturnType<typeof periodMatrix>, period: number, coverages: number[]): Promise<StatisticGof[]> {
  const plain: GofBatch = { row: { id: batch.row.id }, model: batch.model, layout: batch.layout, observed: batch.observed };
  // Several databases may share the worker (tests): the key names the store too.
  const matrixKey = `${storeId}:${batch.row.id}:${period}`;
  return new Promise((resolve, reject) => {
    const send = (withMatrix: boolean) => {
      const id = nextId++;
      const w = gofWorker();
      pending.set(id, { resolve, reject, resend: () => send(true) });
      if (!withMatrix && workerHolds.has(matrixKey)) {
        w.postMessage({ id, batch: plain, period, coverages, matrixKey } satisfies GofWorkerRequest);
        return;
      }
      let matrix: ReturnType<typeof periodMatrix>;
      try {
        matrix = readMatrix();
      } catch (error) {
        pending.delete(id);
        reject(error as Error);
        return;
      }
      workerHolds.delete(matrixKey);
      workerHolds.set(matrixKey, true);
      while (workerHolds.size > MATRICES_KEPT) workerHolds.delete(workerHolds.keys().next().value!);
      w.postMessage({ id, batch: plain, period, coverages, matrixKey, matrix } satisfies GofWorkerRequest, [matrix.data.buffer as ArrayBuffer]);
    };
    send(false);
  });
}

// ---------------------------------------------------------------- the store (one per data source)

let storeCount = 0;

export class GofStore {
  private readonly id = ++storeCount;
  private readonly inFlight = new Map<string, Promise<StatisticGof[]>>();
  private readonly memory = new Map<string, StatisticGof[]>();
  /** How many period computations this store ran (in the worker or, as a fallback, here). */
  computations = 0;

  constructor(private readonly dataSource: DataSource) {
    // No batches run on PostgreSQL yet (server/db/sync.ts), so there is nothing to warm there.
    if (dataSource.options.type !== 'postgres') onBatchDone(syncDb(dataSource), (batchId) => void this.warm(batchId).catch(() => undefined));
  }

  /** The stored GOF of one period at the default coverages, or null when not computed yet. */
  stored(batchId: number, period: number): StatisticGof[] | null {
    // Parsed rows are remembered too: a read then costs a map lookup, not a parse.
    const memoKey = `${batchId}:${period}:${DEFAULT_KEY}`;
    const remembered = this.memory.get(memoKey);
    if (remembered) return remembered;
    const row = syncDb(this.dataSource)
      .prepare(`SELECT "results" FROM "batch_gof" WHERE "batchId" = ? AND "period" = ? AND "coverages" = ?`)
      .get(batchId, period, DEFAULT_KEY) as { results: string } | undefined;
    if (!row) return null;
    const results = fromJson<StatisticGof[]>(row.results);
    this.remember(memoKey, results);
    return results;
  }

  private remember(key: string, results: StatisticGof[]): void {
    if (this.memory.size >= MEMORY_LIMIT) this.memory.delete(this.memory.keys().next().value!);
    this.memory.set(key, results);
  }

  /** Keeps a period's GOF at the default coverages (the first one wins; a result never changes). */
  store(batchId: number, period: number, results: StatisticGof[]): void {
    syncDb(this.dataSource)
      .prepare(`INSERT OR IGNORE INTO "batch_gof" ("batchId", "period", "coverages", "results") VALUES (?, ?, ?, ?)`)
      .run(batchId, period, DEFAULT_KEY, toJson(results));
  }

  /** Every statistic's GOF of one period of a finished batch, computed at most once per coverages. */
  async period(batch: LoadedBatch, period: number, coverages: number[]): Promise<StatisticGof[]> {
    const key = coverageKey(coverages);
    const isDefault = key === DEFAULT_KEY;
    if (isDefault) {
      const hit = this.stored(batch.row.id, period);
      if (hit) return hit;
    }
    const memoKey = `${batch.row.id}:${period}:${key}`;
    const remembered = this.memory.get(memoKey);
    if (remembered) return remembered;
    const running = this.inFlight.get(memoKey);
    if (running) return running;
    const work = (async () => {
      this.computations++;
      const results = await inWorker(this.id, batch, () => periodMatrix(this.dataSource, batch, period), period, coverages);
      if (isDefault) this.store(batch.row.id, period, results);
      this.remember(memoKey, results);
      return results;
    })();
    this.inFlight.set(memoKey, work);
    try {
      return await work;
    } finally {
      this.inFlight.delete(memoKey);
    }
  }

  /**
   * The stored default GOF of every period, computing (in the worker) what is missing. Used by the
   * board and the report before they read `stored` synchronously.
   */
  async ensure(batch: LoadedBatch): Promise<void> {
    for (const period of batch.summary.periods) await this.period(batch, period, [...DEFAULT_COVERAGES]);
  }

  /** The default GOF of every period, on this thread: only for a caller that cannot wait (fallback). */
  storedOrComputeHere(batch: LoadedBatch, period: number): StatisticGof[] {
    const hit = this.stored(batch.row.id, period);
    if (hit) return hit;
    this.computations++;
    const results = computePeriodGof(batch, periodMatrix(this.dataSource, batch, period), period, [...DEFAULT_COVERAGES]);
    this.store(batch.row.id, period, results);
    return results;
  }

  /** Called when a batch finished: computes and stores its GOF. */
  async warm(batchId: number): Promise<void> {
    const row = syncDb(this.dataSource).prepare(`SELECT "studyId" FROM "batches" WHERE "id" = ?`).get(batchId) as { studyId: number } | undefined;
    if (!row || !this.dataSource.isInitialized) return;
    const batch = getBatch(this.dataSource, row.studyId, batchId);
    if (!batch || batch.summary.state !== 'done') return;
    await this.ensure(batch);
  }
}

const stores = new WeakMap<DataSource, GofStore>();

/** The GOF store of a data source (one per data source, made on first use). */
export function gofStoreFor(dataSource: DataSource): GofStore {
  let store = stores.get(dataSource);
  if (!store) {
    store = new GofStore(dataSource);
    stores.set(dataSource, store);
  }
  return store;
}
