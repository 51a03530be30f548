/**
 * Engine benchmarks: ministeps per second, the ministep's cost relative to a floor loop, and the triad
 * census against networkx. Figures only; nothing here passes or fails.
 *
 * Each section is a BenchSection so bench/run.ts (and other areas) can list and run them in order.
 */
import { execFileSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import * as path from 'node:path';
import { buildEffects } from '../server/engine/effects';
import { createRng, streamFor, type Rng } from '../server/engine/prng';
import { simulatePeriod } from '../server/engine/simulate';
import { NetworkState, NO_CACHES } from '../server/engine/state';
import { geodesicDistribution, triadCensus } from '../server/engine/statistics';

export interface BenchSection {
  name: string;
  run(print: (line: string) => void): void | Promise<void>;
}

const fmt = (x: number, digits = 0) => x.toLocaleString('en-GB', { maximumFractionDigits: digits, minimumFractionDigits: digits });

/** A random digraph with mean outdegree about `degree`, a third of ties returned. */
function randomGraph(rng: Rng, n: number, degree: number, caches = NO_CACHES): NetworkState {
  const p = degree / (n - 1) / 1.33;
  const adj = new Uint8Array(n * n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      if (i === j || rng.nextDouble() >= p) continue;
      adj[i * n + j] = 1;
      if (rng.nextDouble() < 0.33) adj[j * n + i] = 1;
    }
  }
  return NetworkState.fromAdjacency(n, adj, caches);
}

/** The six-effect model of the benchmark, with parameters that keep the mean outdegree in single figures. */
function sixEffectModel(n: number, rng: Rng) {
  const years = new Float64Array(n);
  for (let i = 0; i < n; i++) years[i] = Math.floor(rng.nextDouble() * 20);
  const effects = buildEffects(
    [
      { id: 'density' },
      { id: 'reciprocity' },
      { id: 'transitive_triplets' },
      { id: 'indegree_popularity' },
      { id: 'outdegree_activity' },
      { id: 'covariate_similarity', covariate: 'years' },
    ],
    { years },
  );
  // Density from the balance (n - 1) e^(2 beta) ~ 6 of creating and deleting ties, so the mean outdegree
  // stays about 4 to 6 at every n (checked by the "mean outdegree" column).
  const params = Float64Array.of(0.5 * Math.log(6 / (n - 1)) + 0.1, 1.5, 0.2, -0.02, -0.05, 0.8);
  return { effects, params };
}

/** Time fn repeatedly for at least `seconds`; returns seconds per call. */
function timeIt(fn: () => void, seconds: number): number {
  fn(); // warm-up
  let calls = 0;
  const t0 = performance.now();
  let t = t0;
  while (t - t0 < seconds * 1000) {
    fn();
    calls++;
    t = performance.now();
  }
  return (t - t0) / 1000 / calls;
}

/** The floor: draw n uniforms, compute n exponentials, pick one option by inverse CDF. */
function floorLoop(rng: Rng, n: number, cum: Float64Array): number {
  let sum = 0;
  for (let j = 0; j < n; j++) {
    sum += Math.exp(rng.nextDouble() - 0.5);
    cum[j] = sum;
  }
  const target = 0.5 * sum;
  for (let j = 0; j < n - 1; j++) if (target < cum[j]) return j;
  return n - 1;
}

const ministepSection: BenchSection = {
  name: 'simulator: ministeps per second (six effects) and cost relative to the floor loop',
  run(print) {
    print('The floor loop draws n uniforms, computes n exponentials and picks one option. Simulator and floor');
    print('are timed in alternating rounds in the same process; the best round of each is reported.');
    print('   n   ministeps/s   us/ministep   floor us   ratio   toggles %   mean outdegree');
    for (const n of [50, 200, 1000]) {
      const rng = createRng(n);
      const { effects, params } = sixEffectModel(n, rng);
      // Burn in a start network near the model's own stationary density.
      let start = randomGraph(rng, n, 6, { twoPaths: true, sharedOut: true });
      start = simulatePeriod({ start, rate: 30, effects, params, rng }).end;
      const rate = 10;
      let ministeps = 0;
      let toggles = 0;
      let ties = 0;
      let periods = 0;
      let chain = 0;
      const cum = new Float64Array(n);
      const frng = createRng(3);
      let sink = 0;
      const floorReps = Math.max(1, Math.floor(20_000 / n));
      let bestMinistep = Infinity;
      let bestFloor = Infinity;
      const roundSeconds = n >= 1000 ? 1.2 : 0.6;
      const period = () => {
        const res = simulatePeriod({ start, rate, effects, params, rng: streamFor(1, n, chain++) });
        ministeps += res.ministeps;
        toggles += res.changes;
        ties += res.end.ties;
        periods++;
        return res.ministeps;
      };
      period(); // warm-up
      for (let round = 0; round < 3; round++) {
        let steps = 0;
        const t0 = performance.now();
        let t = t0;
        do {
          steps += period();
          t = performance.now();
        } while (t - t0 < roundSeconds * 1000);
        bestMinistep = Math.min(bestMinistep, (t - t0) / 1000 / steps);
        const floorSeconds = timeIt(() => {
          for (let r = 0; r < floorReps; r++) sink += floorLoop(frng, n, cum);
        }, roundSeconds / 2);
        bestFloor = Math.min(bestFloor, floorSeconds / floorReps);
      }
      const usPerMinistep = bestMinistep * 1e6;
      const floorUs = bestFloor * 1e6;
      print(
        `${String(n).padStart(4)}   ${fmt(1e6 / usPerMinistep).padStart(11)}   ${fmt(usPerMinistep, 2).padStart(11)}   ${fmt(floorUs, 2).padStart(8)}   ${fmt(
          usPerMinistep / floorUs,
          2,
        ).padStart(5)}   ${fmt((100 * toggles) / ministeps, 1).padStart(9)}   ${fmt(ties / periods / n, 2).padStart(14)}${sink < 0 ? '!' : ''}`,
      );
    }
    print('targets: >= 300,000 ministeps/s at n = 50; ministep <= 3x the floor loop');
  },
};

const triadSection: BenchSection = {
  name: 'auxiliary statistics: triad census against networkx triadic_census (same graphs, same run)',
  run(print) {
    const dir = mkdtempSync(path.join(tmpdir(), 'wavefit-bench-'));
    const script = path.resolve(__dirname, '../tests/reference/census_reference.py');
    print('   n   mean degree   ours ms   networkx ms   speed-up   geodesic ms');
    for (const [n, degree] of [[50, 6], [200, 6], [200, 30], [1000, 6]] as const) {
      const g = randomGraph(createRng(7 * n + degree), n, degree);
      const ours = timeIt(() => triadCensus(g), 1);
      const geo = timeIt(() => geodesicDistribution(g, 6), 0.5);
      let nxText = 'n/a';
      let speed = 'n/a';
      if (n <= 200) {
        const file = path.join(dir, `g${n}-${degree}.json`);
        writeFileSync(file, JSON.stringify({ n, edges: g.edges() }));
        try {
          const repeats = n <= 50 ? 100 : degree <= 10 ? 10 : 2;
          const out = execFileSync('/usr/bin/python3', [script, '--time', file, String(repeats)], { encoding: 'utf8' });
          const nx = JSON.parse(out).seconds as number;
          nxText = fmt(nx * 1000, 3);
          speed = `${fmt(nx / ours, 1)}x`;
        } catch (e) {
          nxText = `failed (${(e as Error).message.split('\n')[0]})`;
        }
      }
      print(
        `${String(n).padStart(4)}   ${fmt(g.ties / n, 1).padStart(11)}   ${fmt(ours * 1000, 3).padStart(7)}   ${nxText.padStart(11)}   ${speed.padStart(8)}   ${fmt(geo * 1000, 3).padStart(11)}`,
      );
    }
    print('target: triad census >= 20x faster than networkx at n = 200');
  },
};

export const engineSections: BenchSection[] = [ministepSection, triadSection];
