/**
 * Test helpers for the engine checks: calling the Python reference scripts and drawing seeded random
 * networks.
 */
import { execFileSync } from 'node:child_process';
import * as path from 'node:path';
import { createRng, type Rng } from '../../server/engine/prng';
import { NetworkState, type StateCaches } from '../../server/engine/state';

export const PYTHON = '/usr/bin/python3';
export const REFERENCE_DIR = path.resolve(__dirname, '../reference');

/** Run tests/reference/<script> with JSON on stdin and parse its JSON output. */
export function runReference<T>(script: string, input: unknown, args: string[] = []): T {
  const out = execFileSync(PYTHON, [path.join(REFERENCE_DIR, script), ...args], {
    input: JSON.stringify(input),
    encoding: 'utf8',
    maxBuffer: 256 * 1024 * 1024,
  });
  return JSON.parse(out) as T;
}

/** A Bernoulli(p) digraph on n actors. */
export function randomNetwork(rng: Rng, n: number, p: number, caches?: StateCaches): NetworkState {
  const adj = new Uint8Array(n * n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) if (i !== j && rng.nextDouble() < p) adj[i * n + j] = 1;
  return NetworkState.fromAdjacency(n, adj, caches);
}

/** A random digraph with some reciprocated ties, for richer triad mixes. */
export function randomReciprocalNetwork(rng: Rng, n: number, p: number, q: number): NetworkState {
  const adj = new Uint8Array(n * n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      if (i === j || rng.nextDouble() >= p) continue;
      adj[i * n + j] = 1;
      if (rng.nextDouble() < q) adj[j * n + i] = 1;
    }
  }
  return NetworkState.fromAdjacency(n, adj);
}

export { createRng };

/** Mean and (n - 1)-denominator variance. */
export function meanVar(xs: ArrayLike<number>): { mean: number; variance: number } {
  let s = 0;
  for (let k = 0; k < xs.length; k++) s += xs[k];
  const mean = s / xs.length;
  let v = 0;
  for (let k = 0; k < xs.length; k++) v += (xs[k] - mean) ** 2;
  return { mean, variance: v / (xs.length - 1) };
}
