/**
 * What travels through Redis: contexts, chunks and results as V8's structured serialisation (the same
 * format worker threads use, so typed arrays, Maps and doubles arrive bit for bit), base64 inside the
 * JSON of a BullMQ job, raw bytes in a Redis key for contexts. Module paths travel relative to the
 * project root, so a worker host may keep the code in another folder.
 */
import { isAbsolute, relative, resolve } from 'node:path';
import { deserialize, serialize } from 'node:v8';

export const PROJECT_ROOT = resolve(__dirname, '../../..');

export const encode = (value: unknown): string => serialize(value).toString('base64');
export const decode = (text: string): unknown => deserialize(Buffer.from(text, 'base64'));
export const encodeBytes = (value: unknown): Buffer => serialize(value);
export const decodeBytes = (bytes: Buffer): unknown => deserialize(bytes);

export function portableModulePath(modulePath: string): string {
  const rel = relative(PROJECT_ROOT, modulePath);
  return rel.startsWith('..') || isAbsolute(rel) ? modulePath : rel.split('\\').join('/');
}

export function localModulePath(portable: string): string {
  return isAbsolute(portable) ? portable : resolve(PROJECT_ROOT, portable);
}

/** A chunk as a BullMQ job's data. */
export interface ChunkJobData {
  /** Redis key of the job's context (see BullmqBackend). */
  contextKey: string;
  jobId: number;
  chunkIndex: number;
  units: number;
  /** encode(chunk). */
  chunk: string;
}

/** A chunk's answer as a BullMQ job's return value. */
export interface ChunkJobResult {
  /** encode(result). */
  result: string;
  workMs: number;
  /** Which worker host computed it (for the job log). */
  worker: string;
}

/** Progress and log lines from a remote worker (BullMQ job progress data). */
export interface ChunkJobProgress {
  units?: number;
  log?: string;
}

/** Redis queue name (WAVEFIT_QUEUE, default "wavefit-chunks"). */
export function queueNameFromEnv(env: Record<string, string | undefined> = process.env): string {
  const name = env.WAVEFIT_QUEUE || 'wavefit-chunks';
  if (!/^[a-z0-9_-]{1,60}$/i.test(name)) throw new Error(`jobs: WAVEFIT_QUEUE must be 1-60 letters, digits, "-" or "_", got "${name}"`);
  return name;
}
