/** Messages between the queue (main thread) and its workers. */

export type ToWorker =
  | { type: 'context'; jobId: number; modulePath: string; context: unknown }
  | { type: 'forget'; jobId: number }
  | { type: 'run'; taskId: number; jobId: number; chunkIndex: number; chunk: unknown };

export type FromWorker =
  | { type: 'ready' }
  | { type: 'progress'; taskId: number; unitsDone: number }
  | { type: 'log'; taskId: number; line: string }
  | { type: 'result'; taskId: number; result: unknown; workMs: number }
  | { type: 'error'; taskId: number; message: string; stack?: string };
