/**
 * Chain playback, pure: from a replayed chain (start ties and its ministeps) to the network and the
 * running counts after any number of ministeps, and from a time on the period's axis to a ministep.
 * Prefix counts are computed once per chain, so moving to any step costs O(changes up to it) for the
 * network and O(1) for the counts.
 */
import type { ReplayResponse } from '../../shared/explore';

export interface ChainTrack {
  n: number;
  /** Number of ministeps. */
  length: number;
  times: number[];
  /** changes[k], noChange[k], distance[k]: after the first k ministeps (k = 0 .. length). */
  changes: Int32Array;
  noChange: Int32Array;
  distance: Int32Array;
  start: Uint8Array;
  replay: ReplayResponse;
}

export function trackOf(replay: ReplayResponse): ChainTrack {
  const n = replay.actors.length;
  const start = new Uint8Array(n * n);
  for (const [i, j] of replay.startTies) start[i * n + j] = 1;
  const end = new Uint8Array(n * n);
  for (const [i, j] of replay.observedEndTies) end[i * n + j] = 1;
  const unobserved = new Uint8Array(n * n);
  for (const [i, j] of replay.unobservedEnd) unobserved[i * n + j] = 1;
  const L = replay.steps.t.length;
  const changes = new Int32Array(L + 1);
  const noChange = new Int32Array(L + 1);
  const distance = new Int32Array(L + 1);
  const x = Uint8Array.from(start);
  let d = 0;
  for (let k = 0; k < n * n; k++) if (k % (n + 1) !== 0 && !unobserved[k] && x[k] !== end[k]) d++;
  distance[0] = d;
  for (let s = 0; s < L; s++) {
    const j = replay.steps.alter[s];
    changes[s + 1] = changes[s];
    noChange[s + 1] = noChange[s];
    if (j < 0) {
      noChange[s + 1]++;
    } else {
      changes[s + 1]++;
      const k = replay.steps.actor[s] * n + j;
      x[k] ^= 1;
      if (!unobserved[k]) d += x[k] === end[k] ? -1 : 1;
    }
    distance[s + 1] = d;
  }
  return { n, length: L, times: replay.steps.t, changes, noChange, distance, start, replay };
}

/** The number of ministeps with time <= t (binary search). */
export function stepsAtTime(track: ChainTrack, t: number): number {
  let lo = 0;
  let hi = track.length;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if (track.times[mid] <= t) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

export interface Frame {
  /** Ministeps done. */
  done: number;
  adj: Uint8Array;
  changes: number;
  noChange: number;
  distance: number;
  /** The most recent changes (newest first), for marking created and dissolved ties. */
  recent: { from: number; to: number; sign: number; step: number }[];
  /** The last ministep's actor and option (-1 = no change), or null before the first. */
  last: { actor: number; alter: number; t: number } | null;
}

/** The chain after `done` ministeps, with the last `keep` changes listed. */
export function frameOf(track: ChainTrack, done: number, keep = 4): Frame {
  const k = Math.max(0, Math.min(track.length, Math.floor(done)));
  const { n, replay } = track;
  const adj = Uint8Array.from(track.start);
  for (let s = 0; s < k; s++) {
    const j = replay.steps.alter[s];
    if (j >= 0) adj[replay.steps.actor[s] * n + j] ^= 1;
  }
  const recent: Frame['recent'] = [];
  for (let s = k - 1; s >= 0 && recent.length < keep; s--) {
    const j = replay.steps.alter[s];
    if (j >= 0) recent.push({ from: replay.steps.actor[s], to: j, sign: replay.steps.sign[s], step: s });
  }
  return {
    done: k,
    adj,
    changes: track.changes[k],
    noChange: track.noChange[k],
    distance: track.distance[k],
    recent,
    last: k > 0 ? { actor: replay.steps.actor[k - 1], alter: replay.steps.alter[k - 1], t: replay.steps.t[k - 1] } : null,
  };
}

/** Every ministep time of the given chains, merged and sorted (the shared clock's stops). */
export function mergedTimes(tracks: ChainTrack[]): number[] {
  const all: number[] = [];
  for (const tr of tracks) for (const t of tr.times) all.push(t);
  return all.sort((a, b) => a - b);
}

/** The clock after one step forward: the next ministep time of any shown chain (1 after the last). */
export function stepForward(times: number[], t: number): number {
  for (const s of times) if (s > t) return s;
  return 1;
}

/** The clock after one step back: the ministep time before the latest one at or before t (0 at the start). */
export function stepBack(times: number[], t: number): number {
  let idx = -1;
  for (let k = 0; k < times.length; k++) if (times[k] <= t) idx = k;
  else break;
  if (t >= 1 && times.length > 0) return times[times.length - 1];
  return idx >= 1 ? times[idx - 1] : 0;
}
