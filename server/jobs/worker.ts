/**
 * The generic worker: keeps each job's context, runs chunks with the kind's worker module, and sends
 * results back (typed arrays transferred). Pure computation; never touches the database.
 */
import { parentPort } from 'node:worker_threads';
import { pathToFileURL } from 'node:url';
import type { ChunkContext, RunChunk } from './registry';
import type { ToWorker, FromWorker } from './protocol';

const port = parentPort;
if (!port) throw new Error('jobs: worker.ts must run in a worker thread');

const contexts = new Map<number, { modulePath: string; context: unknown }>();
const modules = new Map<string, Promise<RunChunk<unknown, unknown, unknown>>>();

function loadModule(modulePath: string): Promise<RunChunk<unknown, unknown, unknown>> {
  let loaded = modules.get(modulePath);
  if (!loaded) {
    loaded = import(pathToFileURL(modulePath).href).then((mod: Record<string, unknown>) => {
      const run = (mod.runChunk ?? (mod.default as Record<string, unknown> | undefined)?.runChunk) as
        | RunChunk<unknown, unknown, unknown>
        | undefined;
      if (typeof run !== 'function') throw new Error(`jobs: ${modulePath} does not export runChunk`);
      return run;
    });
    modules.set(modulePath, loaded);
  }
  return loaded;
}

/** Array buffers of typed arrays found in a result (up to three levels deep), to transfer. */
function transferables(value: unknown, depth = 0, out = new Set<ArrayBuffer>()): ArrayBuffer[] {
  if (ArrayBuffer.isView(value)) {
    const buffer = value.buffer;
    // Only transfer buffers the view covers entirely (a subarray of a bigger buffer is copied).
    if (buffer instanceof ArrayBuffer && value.byteOffset === 0 && value.byteLength === buffer.byteLength) out.add(buffer);
  } else if (depth < 3 && value !== null && typeof value === 'object') {
    for (const v of Array.isArray(value) ? value : Object.values(value)) transferables(v, depth + 1, out);
  }
  return [...out];
}

function send(message: FromWorker, transfer: ArrayBuffer[] = []): void {
  port!.postMessage(message, transfer);
}

port.on('message', (message: ToWorker) => {
  if (message.type === 'context') {
    contexts.set(message.jobId, { modulePath: message.modulePath, context: message.context });
    return;
  }
  if (message.type === 'forget') {
    contexts.delete(message.jobId);
    return;
  }
  const { taskId, jobId, chunk } = message;
  const entry = contexts.get(jobId);
  const started = performance.now();
  const ctx: ChunkContext = {
    progress: (unitsDone) => send({ type: 'progress', taskId, unitsDone }),
    log: (line) => send({ type: 'log', taskId, line: String(line) }),
  };
  void (async () => {
    try {
      if (!entry) throw new Error(`jobs: no context for job ${jobId} in this worker`);
      const run = await loadModule(entry.modulePath);
      const result = await run(entry.context, chunk, ctx);
      send({ type: 'result', taskId, result, workMs: Math.round(performance.now() - started) }, transferables(result));
    } catch (error) {
      const err = error instanceof Error ? error : new Error(String(error));
      send({ type: 'error', taskId, message: err.message, stack: err.stack });
    }
  })();
});

send({ type: 'ready' });
