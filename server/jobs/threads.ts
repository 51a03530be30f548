/**
 * The embedded backend: chunks computed by worker threads of this process (./pool.ts). Each worker
 * gets a job's context once, then any number of its chunks. A worker that dies is reported as `lost`
 * (the queue computes the chunk again); idle workers stop after a while.
 */
import type { ChunkBackend, ChunkBackendEvents, ChunkTask } from './backend';
import { WorkerPool, type Slot } from './pool';
import type { FromWorker } from './protocol';

export class ThreadBackend implements ChunkBackend {
  readonly name = 'threads';
  readonly capacity: number;
  private readonly pool: WorkerPool;
  private events: ChunkBackendEvents | null = null;
  private readonly tasks = new Map<number, ChunkTask>();
  private idleTimer: NodeJS.Timeout | null = null;
  private stopped = false;

  constructor(
    workers: number,
    private readonly idleShutdownMs = 60_000,
  ) {
    this.capacity = workers;
    this.pool = new WorkerPool(workers, {
      message: (slot, message) => this.onMessage(slot, message),
      exit: (slot, code) => this.onExit(slot, code),
      report: (line) => this.events?.report(line),
    });
  }

  get workersLabel(): string {
    return `${this.capacity} worker(s)`;
  }

  get live(): number {
    return this.pool.live;
  }

  async start(events: ChunkBackendEvents): Promise<void> {
    this.events = events;
    this.stopped = false;
  }

  run(task: ChunkTask): void {
    const slot = this.pool.idleSlot();
    if (!slot) throw new Error('jobs: no idle worker thread (the queue ran more chunks than the capacity)');
    if (this.idleTimer) {
      clearTimeout(this.idleTimer);
      this.idleTimer = null;
    }
    if (!slot.contexts.has(task.jobId)) {
      this.pool.post(slot, { type: 'context', jobId: task.jobId, modulePath: task.modulePath, context: task.context });
      slot.contexts.add(task.jobId);
    }
    slot.task = { taskId: task.taskId, jobId: task.jobId, chunkIndex: task.chunkIndex, units: task.units, liveUnits: 0 };
    this.tasks.set(task.taskId, task);
    slot.worker.ref();
    this.pool.post(slot, { type: 'run', taskId: task.taskId, jobId: task.jobId, chunkIndex: task.chunkIndex, chunk: task.chunk });
  }

  inFlight(): ChunkTask[] {
    return [...this.tasks.values()];
  }

  forgetJob(jobId: number): void {
    for (const slot of this.pool.slots) {
      if (slot && slot.contexts.has(jobId) && !slot.stopping) {
        this.pool.post(slot, { type: 'forget', jobId });
        slot.contexts.delete(jobId);
      }
    }
  }

  async dropJob(jobId: number): Promise<void> {
    const stops: Promise<void>[] = [];
    for (const slot of this.pool.slots) {
      if (!slot) continue;
      if (slot.task?.jobId === jobId) {
        this.tasks.delete(slot.task.taskId);
        stops.push(this.pool.stopSlot(slot));
      } else if (slot.contexts.has(jobId)) {
        this.pool.post(slot, { type: 'forget', jobId });
        slot.contexts.delete(jobId);
      }
    }
    await Promise.all(stops);
  }

  idle(): void {
    if (this.stopped || this.idleTimer) return;
    const busy = this.pool.slots.some((s) => s?.task);
    if (busy || this.pool.live === 0) return;
    this.idleTimer = setTimeout(() => {
      this.idleTimer = null;
      if (!this.pool.slots.some((s) => s?.task)) for (const slot of this.pool.slots) if (slot) void this.pool.stopSlot(slot);
    }, this.idleShutdownMs);
    this.idleTimer.unref();
  }

  async stop(): Promise<void> {
    this.stopped = true;
    if (this.idleTimer) clearTimeout(this.idleTimer);
    this.idleTimer = null;
    this.tasks.clear();
    await Promise.all(this.pool.slots.map((slot) => (slot ? this.pool.stopSlot(slot) : undefined)));
  }

  crashOneForTest(): { jobId: number; chunkIndex: number } | null {
    const slot = this.pool.slots.find((s) => s?.task);
    if (!slot || !slot.task) return null;
    const { jobId, chunkIndex } = slot.task;
    void slot.worker.terminate();
    return { jobId, chunkIndex };
  }

  private onMessage(slot: Slot, message: FromWorker): void {
    if (message.type === 'ready') return;
    const current = slot.task;
    if (!current || current.taskId !== message.taskId) return; // a late message from an abandoned task
    const task = this.tasks.get(current.taskId);
    if (!task) return;
    if (message.type === 'progress') {
      task.liveUnits = message.unitsDone;
      return;
    }
    if (message.type === 'log') {
      this.events?.log(task, message.line);
      return;
    }
    this.tasks.delete(task.taskId);
    this.pool.releaseSlot(slot);
    if (message.type === 'error') this.events?.error(task, message.message);
    else this.events?.result(task, message.result, message.workMs);
  }

  private onExit(slot: Slot, code: number): void {
    this.pool.vacate(slot);
    const current = slot.task;
    slot.task = null;
    if (slot.stopping || this.stopped) return;
    this.events?.report(`jobs: worker ${slot.index} stopped unexpectedly (exit code ${code})`);
    const task = current ? this.tasks.get(current.taskId) : undefined;
    if (task) this.tasks.delete(task.taskId);
    this.events?.lost(task ?? null, `worker stopped unexpectedly`);
  }
}
