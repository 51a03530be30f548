/**
 * The job queue's worker threads: a fixed number of slots, each empty or holding one worker (started
 * on demand through boot.mjs), the chunk it computes and the job contexts it has loaded. What a
 * worker says and when it exits is handed to the queue (./queue.ts), which decides what to do.
 */
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { Worker } from 'node:worker_threads';
import type { FromWorker, ToWorker } from './protocol';

/** A chunk in a worker. */
export interface Task {
  taskId: number;
  jobId: number;
  chunkIndex: number;
  units: number;
  liveUnits: number;
}

export interface Slot {
  index: number;
  worker: Worker;
  task: Task | null;
  contexts: Set<number>;
  /** Set when we stop the worker on purpose (cancel, stop, idle): its exit is not a crash. */
  stopping: boolean;
  exited: Promise<void>;
}

export interface PoolEvents {
  message(slot: Slot, message: FromWorker): void;
  exit(slot: Slot, code: number): void;
  report(line: string): void;
}

export class WorkerPool {
  readonly slots: (Slot | null)[];

  constructor(
    size: number,
    private readonly events: PoolEvents,
  ) {
    this.slots = new Array<Slot | null>(size).fill(null);
  }

  /** A slot whose worker is idle, else a new worker in an empty slot, else null (all busy). */
  idleSlot(): Slot | null {
    for (let i = 0; i < this.slots.length; i++) {
      const slot = this.slots[i];
      if (slot && !slot.task && !slot.stopping) return slot;
    }
    for (let i = 0; i < this.slots.length; i++) {
      if (this.slots[i] === null) return this.spawn(i);
    }
    return null;
  }

  private spawn(index: number): Slot {
    const worker = new Worker(join(__dirname, 'boot.mjs'), {
      execArgv: [],
      workerData: { entry: pathToFileURL(join(__dirname, 'worker.ts')).href },
    });
    let onExit: () => void = () => undefined;
    const exited = new Promise<void>((resolve) => {
      onExit = resolve;
    });
    const slot: Slot = { index, worker, task: null, contexts: new Set(), stopping: false, exited };
    this.slots[index] = slot;
    worker.on('message', (message: FromWorker) => this.events.message(slot, message));
    worker.on('error', (error) => {
      if (!slot.stopping) this.events.report(`jobs: worker ${index} failed: ${error.message}`);
    });
    worker.on('exit', (code) => {
      onExit();
      this.events.exit(slot, code);
    });
    return slot;
  }

  post(slot: Slot, message: ToWorker): void {
    slot.worker.postMessage(message);
  }

  /** The worker finished its chunk; it may idle without keeping the process alive. */
  releaseSlot(slot: Slot): void {
    slot.task = null;
    slot.worker.unref();
  }

  /** Stops a worker on purpose (its exit is then no crash) and empties its slot. */
  async stopSlot(slot: Slot): Promise<void> {
    slot.stopping = true;
    if (this.slots[slot.index] === slot) this.slots[slot.index] = null;
    await slot.worker.terminate();
    await slot.exited;
  }

  /** Empties the slot of a worker that exited (if it still holds it). */
  vacate(slot: Slot): void {
    if (this.slots[slot.index] === slot) this.slots[slot.index] = null;
  }

  /** Number of live worker threads. */
  get live(): number {
    return this.slots.filter((s) => s !== null).length;
  }
}
