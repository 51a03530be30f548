/**
 * The GOF worker thread (started by gofStore.ts through server/jobs/boot.mjs): computes a period's
 * goodness of fit away from the thread that answers HTTP requests, one request at a time. It keeps
 * the last few chain matrices it was sent (MATRICES_KEPT), so a second option on the same period
 * needs no new read of the stored rows; gofStore.ts mirrors which ones it holds.
 */
import { parentPort } from 'node:worker_threads';
import { MATRICES_KEPT, computePeriodGof, type GofBatch, type PeriodMatrix } from './gofCompute';

export interface GofWorkerRequest {
  id: number;
  batch: GofBatch;
  period: number;
  coverages: number[];
  /** batchId:period */
  matrixKey: string;
  /** Sent when the worker does not hold it yet. */
  matrix?: PeriodMatrix;
}

export type GofWorkerReply =
  | { id: number; ok: true; results: ReturnType<typeof computePeriodGof> }
  | { id: number; ok: false; message: string; status?: number; code?: string; needMatrix?: boolean };

const matrices = new Map<string, PeriodMatrix>();

parentPort!.on('message', (req: GofWorkerRequest) => {
  let reply: GofWorkerReply;
  try {
    if (req.matrix) {
      matrices.delete(req.matrixKey);
      matrices.set(req.matrixKey, req.matrix);
      while (matrices.size > MATRICES_KEPT) matrices.delete(matrices.keys().next().value!);
    }
    const matrix = matrices.get(req.matrixKey);
    if (!matrix) {
      parentPort!.postMessage({ id: req.id, ok: false, message: 'matrix not held', needMatrix: true } satisfies GofWorkerReply);
      return;
    }
    reply = { id: req.id, ok: true, results: computePeriodGof(req.batch, matrix, req.period, req.coverages) };
  } catch (error) {
    const { status, code } = error as { status?: unknown; code?: unknown };
    reply = {
      id: req.id,
      ok: false,
      message: error instanceof Error ? error.message : String(error),
      status: typeof status === 'number' ? status : undefined,
      code: typeof code === 'string' ? code : undefined,
    };
  }
  parentPort!.postMessage(reply);
});
