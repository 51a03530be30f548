/**
 * Looking inside the process: the exact choice probabilities of one ministep, a recorded replay of one
 * simulated period (every ministep kept), and tie timelines (share of chains holding a tie over the
 * period's continuous time).
 *
 * Purpose: the explore views show how a model gets from one wave to the next, not only where it ends.
 * Everything here is recomputed from seeds; nothing large is stored.
 *
 * References:
 * - Snijders, T.A.B. (2001). The statistical evaluation of social network dynamics.
 *   Sociological Methodology 31, 361-395. (the ministep: multinomial logit over the options
 *   "toggle i->j" and "no change", with utility sum_k beta_k delta_ijk)
 * - McFadden, D. (1974). Conditional logit analysis of qualitative choice behavior. (the choice rule)
 * - Wavefit METHODS.md sections 2 and 3.
 */
import { cachesFor, type Effect } from './effects';
import { simulatePeriod, type SimulateOptions } from './simulate';
import { NetworkState } from './state';

/** One option of a ministep of actor i. */
export interface ChoiceOption {
  /** The alter j whose tie i->j would be toggled, or -1 for "no change". */
  alter: number;
  /** 1 when the tie i->j exists now (so choosing it dissolves it), 0 when choosing it creates it; 0 for "no change". */
  tie: number;
  /** Multinomial-logit probability of this option. */
  probability: number;
  /** Utility sum_k beta_k delta_ijk ("no change" has 0). */
  utility: number;
  /** beta_k delta_ijk per effect, in the effects' order (all 0 for "no change"). */
  contributions: number[];
}

export interface ChoiceExplanation {
  actor: number;
  /** Alters in index order (masked ones left out), then "no change" last. */
  options: ChoiceOption[];
}

/** A state with the caches the effects' change statistics need (the given one if it has them). */
function withCaches(state: NetworkState, effects: ReadonlyArray<Effect>): NetworkState {
  const need = cachesFor(effects);
  if ((need.twoPaths && state.p2 === null) || (need.sharedOut && state.so === null)) return state.clone({ ...state.caches, ...need });
  return state;
}

function checkParams(effects: ReadonlyArray<Effect>, params: ArrayLike<number>): void {
  if (params.length !== effects.length) throw new Error(`explore: ${effects.length} effects but ${params.length} parameters`);
  for (let k = 0; k < params.length; k++) {
    if (!Number.isFinite(params[k])) throw new Error(`explore: the parameter of ${effects[k].key} is not a finite number`);
  }
}

/**
 * The exact choice probabilities of actor i at `state`, with each effect's part of every option's
 * utility. `allowed` (n*n, 1 = may be offered) leaves out fixed pairs; by default every alter is offered.
 *
 * @throws Error("explore: ...") for an actor outside 0..n-1 or mismatched parameters
 */
export function explainChoice(
  state: NetworkState,
  i: number,
  effects: ReadonlyArray<Effect>,
  params: ArrayLike<number>,
  allowed?: ArrayLike<number>,
): ChoiceExplanation {
  const n = state.n;
  if (!Number.isInteger(i) || i < 0 || i >= n) throw new Error(`explore: actor ${String(i)} is outside 0..${n - 1}`);
  checkParams(effects, params);
  const s = withCaches(state, effects);
  const K = effects.length;
  const options: ChoiceOption[] = [];
  for (let j = 0; j < n; j++) {
    if (j === i || (allowed !== undefined && allowed[i * n + j] === 0)) continue;
    const contributions = new Array<number>(K);
    let utility = 0;
    for (let k = 0; k < K; k++) {
      const c = params[k] === 0 ? 0 : params[k] * effects[k].change(s, i, j);
      contributions[k] = c;
      utility += c;
    }
    options.push({ alter: j, tie: s.adj[i * n + j], probability: 0, utility, contributions });
  }
  options.push({ alter: -1, tie: 0, probability: 0, utility: 0, contributions: new Array<number>(K).fill(0) });
  let max = 0;
  for (const o of options) if (o.utility > max) max = o.utility;
  let sum = 0;
  for (const o of options) {
    o.probability = Math.exp(o.utility - max);
    sum += o.probability;
  }
  for (const o of options) o.probability /= sum;
  return { actor: i, options };
}

/**
 * First-ministep probabilities of every actor: row i holds p_ij for each alter j and, on the diagonal,
 * the probability of "no change". Rows sum to 1.
 */
export function choiceMatrix(
  state: NetworkState,
  effects: ReadonlyArray<Effect>,
  params: ArrayLike<number>,
  allowed?: ArrayLike<number>,
): Float64Array {
  const n = state.n;
  const out = new Float64Array(n * n);
  const s = withCaches(state, effects);
  for (let i = 0; i < n; i++) {
    for (const o of explainChoice(s, i, effects, params, allowed).options) out[i * n + (o.alter < 0 ? i : o.alter)] = o.probability;
  }
  return out;
}

/** Every ministep of one simulated period, in order. */
export interface RecordedPeriod {
  /** Time of each ministep in (0, 1). */
  times: Float64Array;
  actors: Int32Array;
  /** The toggled alter, or -1 for "no change". */
  alters: Int32Array;
  /** +1 created, -1 dissolved, 0 no change. */
  signs: Int8Array;
  ministeps: number;
  changes: number;
  end: NetworkState;
}

/** Growable columns for recording ministeps without per-step objects. */
export class MinistepLog {
  times = new Float64Array(256);
  actors = new Int32Array(256);
  alters = new Int32Array(256);
  signs = new Int8Array(256);
  length = 0;

  push(t: number, actor: number, alter: number, sign: number): void {
    if (this.length === this.times.length) {
      const grow = <T extends Float64Array | Int32Array | Int8Array>(a: T): T => {
        const b = new (a.constructor as new (n: number) => T)(a.length * 2);
        b.set(a);
        return b;
      };
      this.times = grow(this.times);
      this.actors = grow(this.actors);
      this.alters = grow(this.alters);
      this.signs = grow(this.signs);
    }
    const k = this.length++;
    this.times[k] = t;
    this.actors[k] = actor;
    this.alters[k] = alter;
    this.signs[k] = sign;
  }

  /** The observer to pass to simulatePeriod. */
  readonly observer = (t: number, actor: number, choice: number, sign: number): void => {
    this.push(t, actor, choice === actor ? -1 : choice, sign);
  };

  columns(): Pick<RecordedPeriod, 'times' | 'actors' | 'alters' | 'signs'> {
    return {
      times: this.times.slice(0, this.length),
      actors: this.actors.slice(0, this.length),
      alters: this.alters.slice(0, this.length),
      signs: this.signs.slice(0, this.length),
    };
  }
}

/** simulatePeriod with every ministep recorded. Same options, same random numbers, same chain. */
export function recordPeriod(options: Omit<SimulateOptions, 'observer'>): RecordedPeriod {
  const log = new MinistepLog();
  const result = simulatePeriod({ ...options, observer: log.observer });
  return { ...log.columns(), ministeps: result.ministeps, changes: result.changes, end: result.end };
}

/**
 * Tie timelines: for chosen ordered pairs, how many chains hold the tie at each time of a grid in [0, 1].
 * Feed it chain by chain (as a simulatePeriod observer, or from a recorded period); the value at grid
 * time g is the tie after every ministep with time <= g (so g = 0 is the start, g = 1 the end).
 */
export class TieTimelines {
  readonly counts: Int32Array[];
  chains = 0;
  private readonly index: Int32Array;
  private readonly value: Uint8Array;
  private readonly filled: Int32Array;

  constructor(
    readonly n: number,
    private readonly start: ArrayLike<number>,
    readonly pairs: ReadonlyArray<readonly [number, number]>,
    readonly grid: ReadonlyArray<number>,
  ) {
    for (let g = 0; g < grid.length; g++) {
      if (!(grid[g] >= 0 && grid[g] <= 1) || (g > 0 && grid[g] < grid[g - 1])) throw new Error('explore: the time grid must rise within [0, 1]');
    }
    if (start.length !== n * n) throw new Error(`explore: the start network has ${start.length} entries for ${n} actors`);
    this.index = new Int32Array(n * n).fill(-1);
    pairs.forEach(([i, j], p) => {
      if (!Number.isInteger(i) || !Number.isInteger(j) || i < 0 || j < 0 || i >= n || j >= n || i === j) {
        throw new Error(`explore: pair (${String(i)}, ${String(j)}) is not a pair of two different actors 0..${n - 1}`);
      }
      if (this.index[i * n + j] >= 0) throw new Error(`explore: pair (${i}, ${j}) is listed twice`);
      this.index[i * n + j] = p;
    });
    this.counts = pairs.map(() => new Int32Array(grid.length));
    this.value = new Uint8Array(pairs.length);
    this.filled = new Int32Array(pairs.length);
  }

  beginChain(): void {
    this.pairs.forEach(([i, j], p) => {
      this.value[p] = this.start[i * this.n + j] ? 1 : 0;
      this.filled[p] = 0;
    });
  }

  /** Ministep observer (see SimulateOptions.observer). */
  readonly observe = (t: number, actor: number, choice: number, sign: number): void => {
    if (sign === 0) return;
    const p = this.index[actor * this.n + choice];
    if (p < 0) return;
    const grid = this.grid;
    const c = this.counts[p];
    let g = this.filled[p];
    const v = this.value[p];
    while (g < grid.length && grid[g] < t) c[g++] += v;
    this.filled[p] = g;
    this.value[p] = 1 - v;
  };

  endChain(): void {
    for (let p = 0; p < this.pairs.length; p++) {
      const c = this.counts[p];
      const v = this.value[p];
      for (let g = this.filled[p]; g < this.grid.length; g++) c[g] += v;
    }
    this.chains++;
  }

  /** A whole recorded chain at once. */
  addRecorded(rec: Pick<RecordedPeriod, 'times' | 'actors' | 'alters' | 'signs'>): void {
    this.beginChain();
    for (let k = 0; k < rec.times.length; k++) {
      if (rec.alters[k] >= 0) this.observe(rec.times[k], rec.actors[k], rec.alters[k], rec.signs[k]);
    }
    this.endChain();
  }

  /** Shares: shares[p][g] = counts / chains. */
  shares(): number[][] {
    return this.counts.map((c) => Array.from(c, (v) => (this.chains > 0 ? v / this.chains : 0)));
  }
}

/** An evenly spaced grid of `points` times from 0 to 1 (points >= 2). */
export function evenGrid(points: number): number[] {
  if (!Number.isInteger(points) || points < 2) throw new Error(`explore: a grid needs at least 2 points, got ${String(points)}`);
  return Array.from({ length: points }, (_, g) => (g === points - 1 ? 1 : g / (points - 1)));
}

/**
 * An actor order that puts actors with similar ties next to each other: average-linkage agglomerative
 * clustering on the Jaccard distance between actors' tie profiles (out-ties and in-ties side by side),
 * read off in dendrogram leaf order. Deterministic (ties in distance go to the lower index), so the
 * same network always gives the same order.
 *
 * References: Sokal, R.R. & Michener, C.D. (1958). A statistical method for evaluating systematic
 * relationships. University of Kansas Science Bulletin 38, 1409-1438 (average linkage, UPGMA);
 * Jaccard, P. (1901), the similarity of two sets.
 */
export function clusterOrder(state: NetworkState): number[] {
  const { n, adj, adjT } = state;
  if (n <= 2) return Array.from({ length: n }, (_, i) => i);
  const dist = new Float64Array(n * n);
  for (let a = 0; a < n; a++) {
    for (let b = a + 1; b < n; b++) {
      let both = 0;
      let either = 0;
      for (let h = 0; h < n; h++) {
        const xa = adj[a * n + h];
        const xb = adj[b * n + h];
        const ya = adjT[a * n + h];
        const yb = adjT[b * n + h];
        both += (xa & xb) + (ya & yb);
        either += (xa | xb) + (ya | yb);
      }
      const d = either === 0 ? 0 : 1 - both / either;
      dist[a * n + b] = d;
      dist[b * n + a] = d;
    }
  }
  // Clusters as leaf lists; merge the closest pair (average linkage) until one is left.
  let clusters: number[][] = Array.from({ length: n }, (_, i) => [i]);
  const avg = (x: number[], y: number[]) => {
    let s = 0;
    for (const a of x) for (const b of y) s += dist[a * n + b];
    return s / (x.length * y.length);
  };
  while (clusters.length > 1) {
    let best = Infinity;
    let bx = 0;
    let by = 1;
    for (let x = 0; x < clusters.length; x++) {
      for (let y = x + 1; y < clusters.length; y++) {
        const d = avg(clusters[x], clusters[y]);
        if (d < best - 1e-12) {
          best = d;
          bx = x;
          by = y;
        }
      }
    }
    const merged = [...clusters[bx], ...clusters[by]];
    clusters = clusters.filter((_, k) => k !== bx && k !== by);
    clusters.splice(bx, 0, merged);
  }
  return clusters[0];
}
