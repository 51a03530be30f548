// Worker thread entry: makes TypeScript loadable (tsx's CommonJS and ESM hooks, registered inside
// this thread, because hooks of the parent are not inherited when the parent runs under vitest or plain
// node), then loads the generic worker. Works the same under `npm start` (tsx), vitest and the benchmark.
import { workerData } from 'node:worker_threads';
import { register as registerCjs } from 'tsx/cjs/api';
import { register as registerEsm } from 'tsx/esm/api';

registerCjs();
registerEsm();
await import(workerData.entry);
