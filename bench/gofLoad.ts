/**
 * Goodness-of-fit reads of a 20,000-chain batch through the real HTTP server on loopback, and /health
 * while 50 readers hammer the GOF endpoints and another batch runs. Bounded: every reader stops after
 * a fixed number of requests or 10 s, whichever comes first. Figures are printed, never judged;
 * targets: every board/GOF read at most 20 ms, /health p99 below 100 ms under the load.
 */
import { mkdtempSync, rmSync } from 'node:fs';
import type { AddressInfo } from 'node:net';
import { loadavg, tmpdir } from 'node:os';
import { Worker } from 'node:worker_threads';
import { join } from 'node:path';
import { createApp } from '../server/app';
import { hashPassword } from '../server/auth/passwords';
import { gofStoreFor } from '../server/batches/gofStore';
import { gofSummaryOf, periodMatrix } from '../server/batches/gof';
import { createBatch, getBatch } from '../server/batches/service';
import { testConfig } from '../server/config';
import { openDataSource } from '../server/db/dataSource';
import { jobQueueFor, stopJobQueue } from '../server/jobs';
import { createOutboxMailer } from '../server/mail/mailer';
import { body, makeStudy } from './batches';
import type { BenchSection } from './engine';

const BIG = 20_000;
const RUNNING = 3000;
const READERS = 50;
const PER_READER = 40;
const LOAD_MS = 10_000;

const fmt = (x: number, digits = 1) => x.toFixed(digits);

/** The load generator (plain JavaScript, run in a worker thread): bounded in requests and time. */
const LOAD_SCRIPT = `
const { parentPort, workerData: d } = require('node:worker_threads');
const until = performance.now() + d.loadMs;
let readerRequests = 0, failures = 0;
async function get(path) {
  const t0 = performance.now();
  const res = await fetch(d.base + path, { headers: d.headers });
  await res.arrayBuffer();
  if (res.status !== 200) failures++;
  return performance.now() - t0;
}
const readers = Array.from({ length: d.readers }, async (_, r) => {
  for (let i = 0; i < d.perReader && performance.now() < until; i++) {
    const path = i % 10 === 9 ? d.fresh + '0.' + (50 + ((r * d.perReader + i) % 45)) + ',0.97' : d.paths[(r + i) % d.paths.length];
    await get(path);
    readerRequests++;
  }
});
const health = [];
const prober = (async () => {
  while (performance.now() < until && health.length < 500) {
    health.push(await get('/health'));
    await new Promise((r) => setTimeout(r, 20));
  }
})();
Promise.all([...readers, prober]).then(() => parentPort.postMessage({ health, readerRequests, failures }));
`;
function quantile(values: number[], q: number): number {
  const s = [...values].sort((a, b) => a - b);
  return s[Math.min(s.length - 1, Math.max(0, Math.ceil(q * s.length) - 1))];
}
const stats = (v: number[]) => `median ${fmt(quantile(v, 0.5))} ms, p99 ${fmt(quantile(v, 0.99))} ms, max ${fmt(Math.max(...v))} ms (${v.length} requests)`;

const section: BenchSection = {
  name: `GOF reads of a ${BIG}-chain batch over HTTP, and /health under ${READERS} concurrent GOF readers`,
  async run(print) {
    print(`load average before: ${loadavg().map((x) => x.toFixed(2)).join(', ')} (2 cores: above 2, other processes skew every figure here)`);
    const dir = mkdtempSync(join(tmpdir(), 'wavefit-bench-gof-'));
    const ds = await openDataSource({ database: join(dir, 'bench.sqlite') });
    const config = testConfig({ dbPath: join(dir, 'bench.sqlite'), loginRateLimit: { max: 1000, windowMs: 60_000 } });
    const app = createApp({ dataSource: ds, mailer: createOutboxMailer({ from: config.mailFrom }), config }, { logError: (e) => console.error(e) });
    const server = app.listen(0, '127.0.0.1');
    await new Promise((r) => server.once('listening', r));
    const base = `http://127.0.0.1:${(server.address() as AddressInfo).port}/api`;
    try {
      const ids = await makeStudy(ds);
      await ds.query(`UPDATE "users" SET "isAdmin" = 1, "passwordHash" = ? WHERE "id" = ?`, [await hashPassword('bench-password-1', config.passwordHash), ids.userId]);
      const login = await fetch(`${base}/auth/login`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ email: 'bench@harbourside.example', password: 'bench-password-1' }) });
      const headers = { authorization: `Bearer ${((await login.json()) as { token: string }).token}` };
      const get = async (path: string) => {
        const t0 = performance.now();
        const res = await fetch(base + path, { headers });
        await res.arrayBuffer();
        if (res.status !== 200) throw new Error(`bench: ${path} answered ${res.status}`);
        return performance.now() - t0;
      };

      const queue = jobQueueFor(ds, { workers: 2 });
      const s0 = performance.now();
      const bigId = await createBatch(ds, { ...ids, body: body(BIG, 2026) });
      const [{ jobId }] = await ds.query(`SELECT "jobId" FROM "batches" WHERE "id" = ?`, [bigId]);
      if ((await queue.whenSettled(jobId)) !== 'done') throw new Error('bench: the big batch did not finish');
      print(`simulated ${BIG} chains in ${fmt((performance.now() - s0) / 1000)} s`);
      const store = gofStoreFor(ds);
      for (let i = 0; i < 400 && !store.stored(bigId, 1); i++) await new Promise((r) => setTimeout(r, 50));
      print(`GOF stored when the batch finished (computed in the worker): ${store.stored(bigId, 1) ? 'yes' : 'NO'}`);

      const batch = getBatch(ds, ids.studyId, bigId)!;
      const m0 = performance.now();
      gofSummaryOf(batch, periodMatrix(ds, batch, 1), 1, [0.5, 0.9]);
      print(`for comparison, the GOF of all statistics computed on the calling thread (what every read did before): ${fmt(performance.now() - m0)} ms`);

      const B = `/studies/${ids.studyId}/batches/${bigId}`;
      const reads: Record<string, string> = {
        'GET /gof (triad census)': `${B}/gof?statistic=triad_census&period=1`,
        'GET /gof (geodesic distances)': `${B}/gof?statistic=geodesic_distribution&period=1`,
        'GET /gof/summary': `${B}/gof/summary?period=1`,
        'GET /board/chart': `${B}/board/chart?statistic=triad_census&period=1`,
        'GET /board': `${B}/board`,
      };
      let worst = 0;
      for (const [name, path] of Object.entries(reads)) {
        await get(path); // first read after a restart of this reader's caches
        const times: number[] = [];
        for (let i = 0; i < 30; i++) times.push(await get(path));
        worst = Math.max(worst, quantile(times, 0.99));
        print(`${name}: ${stats(times)}`);
      }
      const c0 = performance.now();
      await get(`${B}/gof/summary?period=1&coverage=0.8,0.95`);
      print(`a new coverage (computed once in the worker): ${fmt(performance.now() - c0)} ms for its first read`);
      print(`target: every board/GOF read at most 20 ms -> ${worst <= 20 ? 'met' : 'NOT met'} (worst p99 ${fmt(worst)} ms)`);

      // Load: another batch runs, 50 readers read GOF (some with new coverages, computed in the worker),
      // one prober reads /health every 20 ms.
      const r0 = performance.now();
      const runningId = await createBatch(ds, { ...ids, body: body(RUNNING, 7) });
      const [{ jobId: runningJob }] = await ds.query(`SELECT "jobId" FROM "batches" WHERE "id" = ?`, [runningId]);
      const runningDone = queue.whenSettled(runningJob).then(() => performance.now() - r0);
      // The readers and the prober run in their own thread, so their HTTP client work does not share
      // the server's event loop (as it would not in real use).
      const load = await new Promise<{ health: number[]; readerRequests: number; failures: number }>((resolve, reject) => {
        const w = new Worker(LOAD_SCRIPT, {
          eval: true,
          workerData: { base, headers, paths: Object.values(reads), fresh: `${B}/gof/summary?period=1&coverage=`, readers: READERS, perReader: PER_READER, loadMs: LOAD_MS },
        });
        w.once('message', resolve);
        w.once('error', reject);
      });
      const { health, readerRequests } = load;
      if (load.failures) print(`(${load.failures} reader requests failed)`);
      print(`under load: ${READERS} readers sent ${readerRequests} GOF requests while a ${RUNNING}-chain batch ran`);
      print(`/health: ${stats(health)}`);
      print(`target: /health p99 below 100 ms -> ${quantile(health, 0.99) < 100 ? 'met' : 'NOT met'}`);
      print(`the running batch took ${fmt((await runningDone) / 1000)} s`);
      const a0 = performance.now();
      const aloneId = await createBatch(ds, { ...ids, body: body(RUNNING, 8) });
      const [{ jobId: aloneJob }] = await ds.query(`SELECT "jobId" FROM "batches" WHERE "id" = ?`, [aloneId]);
      await queue.whenSettled(aloneJob);
      print(`the same batch alone: ${fmt((performance.now() - a0) / 1000)} s`);
      print(`load average after: ${loadavg().map((x) => x.toFixed(2)).join(', ')}`);
    } finally {
      server.close();
      await stopJobQueue(ds);
      await ds.destroy();
      rmSync(dir, { recursive: true, force: true });
    }
  },
};

export const gofLoadSections: BenchSection[] = [section];
