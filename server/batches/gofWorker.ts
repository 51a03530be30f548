/**
 * The GOF worker thread (started by gofStore.ts through server/jobs/boot.mjs): computes a period's
 * goodness of fit away from the thread that answers HTTP requests, one request at a time.
 */
import { parentPort } from 'node:worker_threads';
import { computePeriodGof, type GofBatch, type PeriodMatrix } from './gofCompute';

export interface GofWorkerRequest {
  id: number;
  batch: GofBatch;
  period: number;
  coverages: number[];
  matrix: PeriodMatrix;
}

export type GofWorkerReply =
  | { id: number; ok: true; results: ReturnType<typeof computePeriodGof> }
  | { id: number; ok: false; message: string; status?: number };

parentPort!.on('message', (req: GofWorkerRequest) => {
  let reply: GofWorkerReply;
  try {
    reply = { id: req.id, ok: true, results: computePeriodGof(req.batch, req.matrix, req.period, req.coverages) };
  } catch (error) {
    const status = (error as { status?: unknown }).status;
    reply = { id: req.id, ok: false, message: error instanceof Error ? error.message : String(error), status: typeof status === 'number' ? status : undefined };
  }
  parentPort!.postMessage(reply);
});
