/**
 * Benchmarks of the explore views on 50 actors (six structural effects, rate 6, every auxiliary
 * statistic): re-simulating one chain with every ministep recorded (the batch worker's simulateChain,
 * as the replay endpoint runs it), laying it out (seeded ForceAtlas2, 300 iterations, not cached), the
 * screen's playback preparation (prefix counts) and one frame; the choice overview (all actors x
 * alters); tie timelines over 1000 chains. Figures are printed, never judged; the target for one chain
 * re-simulated and laid out is under 100 ms.
 */
import { AUX_STATISTIC_IDS } from '../shared/auxStatistics';
import type { ReplayResponse } from '../shared/explore';
import type { BatchContext } from '../server/batches/context';
import { simulateChain } from '../server/batches/worker';
import { buildEffects } from '../server/engine/effects';
import { choiceMatrix, clusterOrder, MinistepLog, TieTimelines, evenGrid } from '../server/engine/explore';
import { createRng, streamFor } from '../server/engine/prng';
import { simulatePeriod } from '../server/engine/simulate';
import { NetworkState } from '../server/engine/state';
import { resolveAuxOptions, auxLabels } from '../server/engine/statistics';
import { seededLayout } from '../server/data/layout';
import { frameOf, trackOf } from '../features/explore/playback';
import type { BenchSection } from './engine';

const N = 50;
const RATE = 6;
const EFFECTS = [
  { id: 'density' as const, value: -2.4 },
  { id: 'reciprocity' as const, value: 1.5 },
  { id: 'transitive_triplets' as const, value: 0.25 },
  { id: 'three_cycles' as const, value: -0.1 },
  { id: 'indegree_popularity' as const, value: 0.03 },
  { id: 'outdegree_activity' as const, value: -0.02 },
];

function edgesOf(adj: ArrayLike<number>): Array<[number, number]> {
  const out: Array<[number, number]> = [];
  for (let i = 0; i < N; i++) for (let j = 0; j < N; j++) if (adj[i * N + j]) out.push([i, j]);
  return out;
}

function setting() {
  const rng = createRng(5150);
  const start = new Uint8Array(N * N);
  for (let i = 0; i < N; i++) for (let j = 0; j < N; j++) if (i !== j && rng.nextDouble() < 0.07) start[i * N + j] = 1;
  const effects = buildEffects(EFFECTS.map((e) => ({ id: e.id })));
  const params = EFFECTS.map((e) => e.value);
  const end = simulatePeriod({ start, rate: RATE, effects, params, rng: streamFor(5150, 1) }).end.adj;
  const options = resolveAuxOptions(N);
  const width = AUX_STATISTIC_IDS.reduce((s, id) => s + auxLabels(id, options).length, 0);
  const context: BatchContext = {
    batchId: 1,
    seed: 777,
    n: N,
    statistics: [...AUX_STATISTIC_IDS],
    maxDegree: options.maxDegree,
    maxDistance: options.maxDistance,
    width,
    effects: EFFECTS.map((e) => ({ id: e.id })),
    params,
    periods: [{ period: 1, rate: RATE, start, end, endMissing: null, covariates: {}, centring: {} }],
  };
  return { start, end, effects, params, context };
}

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)];
}

export const exploreSections: BenchSection[] = [
  {
    name: 'explore: one 50-actor chain re-simulated, laid out and prepared for playback',
    run(print) {
      const { start, end, context } = setting();
      const row = new Float64Array(context.width);
      const sim: number[] = [];
      const lay: number[] = [];
      const prep: number[] = [];
      const frame: number[] = [];
      const total: number[] = [];
      let steps = 0;
      for (let rep = 0; rep < 25; rep++) {
        const chain = rep;
        const t0 = performance.now();
        const log = new MinistepLog();
        simulateChain(context, 0, chain, row, undefined, log.observer);
        const t1 = performance.now();
        const positions = seededLayout(N, [...edgesOf(start), ...edgesOf(end)], 1000 + rep);
        const t2 = performance.now();
        const cols = log.columns();
        const replay = {
          actors: Array.from({ length: N }, (_, i) => `crew${i + 1}`),
          positions,
          startTies: edgesOf(start),
          observedEndTies: edgesOf(end),
          unobservedEnd: [],
          steps: { t: Array.from(cols.times), actor: Array.from(cols.actors), alter: Array.from(cols.alters), sign: Array.from(cols.signs) },
        } as unknown as ReplayResponse;
        const track = trackOf(replay);
        const t3 = performance.now();
        frameOf(track, Math.floor(track.length / 2));
        const t4 = performance.now();
        steps += log.length;
        if (rep >= 3) {
          sim.push(t1 - t0);
          lay.push(t2 - t1);
          prep.push(t3 - t2);
          frame.push(t4 - t3);
          total.push(t3 - t0);
        }
      }
      print(`ministeps per chain (mean)           ${(steps / 25).toFixed(0)}`);
      print(`re-simulate with recording (median)  ${median(sim).toFixed(2)} ms   (incl. all auxiliary statistics of the end)`);
      print(`seeded layout, 300 iterations        ${median(lay).toFixed(2)} ms`);
      print(`playback prefix counts               ${median(prep).toFixed(2)} ms`);
      print(`one frame at the middle              ${median(frame).toFixed(3)} ms`);
      print(`re-simulate + layout + prepare       ${median(total).toFixed(2)} ms median, ${Math.max(...total).toFixed(2)} ms worst of ${total.length}   (target < 100 ms)`);
    },
  },
  {
    name: 'explore: choice overview and tie timelines on 50 actors',
    run(print) {
      const { start, effects, params, context } = setting();
      const state = NetworkState.fromAdjacency(N, start);
      let t0 = performance.now();
      for (let k = 0; k < 10; k++) choiceMatrix(state, effects, params);
      print(`all actors x alters probabilities    ${((performance.now() - t0) / 10).toFixed(2)} ms`);
      t0 = performance.now();
      clusterOrder(state);
      print(`cluster order of the actors          ${(performance.now() - t0).toFixed(2)} ms`);
      const pairs: Array<[number, number]> = [[0, 1], [1, 0], [2, 3], [4, 5], [6, 7], [8, 9]];
      const tl = new TieTimelines(N, start, pairs, evenGrid(51));
      const row = new Float64Array(context.width);
      t0 = performance.now();
      for (let c = 0; c < 1000; c++) {
        tl.beginChain();
        simulateChain(context, 0, c, row, undefined, tl.observe);
        tl.endChain();
      }
      print(`tie timelines, 6 pairs, 1000 chains  ${(performance.now() - t0).toFixed(0)} ms`);
    },
  },
];
