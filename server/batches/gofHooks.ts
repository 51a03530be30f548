/**
 * Who wants to hear that a batch finished, per database handle: the GOF store of each data source
 * registers here, and the batch job kind (jobKind.ts) calls it after the finishing transaction, so
 * the goodness of fit is computed once, right when the batch is done. Kept apart to avoid an import
 * cycle between jobKind.ts and gofStore.ts.
 */
const listeners = new WeakMap<object, (batchId: number) => void>();

export function onBatchDone(db: object, listener: (batchId: number) => void): void {
  listeners.set(db, listener);
}

/** Called inside the finishing transaction: the listener runs after it, on the next turn. */
export function batchDone(db: object, batchId: number): void {
  const listener = listeners.get(db);
  if (listener) setImmediate(() => listener(batchId));
}
