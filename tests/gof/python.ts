/** Runs a reference script with Debian's Python (numpy, scipy, networkx), JSON in and JSON out. */
import { spawnSync } from 'node:child_process';

export function runPython<T>(script: string, input: unknown): T {
  const result = spawnSync('/usr/bin/python3', [script], { input: JSON.stringify(input), encoding: 'utf8', maxBuffer: 256 * 1024 * 1024 });
  if (result.status !== 0) throw new Error(`python reference ${script} failed: ${result.stderr || result.error?.message}`);
  return JSON.parse(result.stdout) as T;
}
