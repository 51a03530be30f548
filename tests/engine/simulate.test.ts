/**
 * Checks of the period simulator (server/engine/simulate.ts) against closed forms, sampling laws and its
 * own contract (seeds, masks, caps, bad input).
 */
import * as path from 'node:path';
import { Worker } from 'node:worker_threads';
import { describe, expect, it } from 'vitest';
import { buildEffects } from '../../server/engine/effects';
import { createRng, streamFor } from '../../server/engine/prng';
import { hamming, simulatePeriod, targetStatistics } from '../../server/engine/simulate';
import { NetworkState } from '../../server/engine/state';
import { meanVar, randomNetwork } from './helpers';

const zeroModel = () => buildEffects([{ id: 'density' }, { id: 'reciprocity' }]);

describe('simulator: all parameters zero (closed forms of METHODS.md 7c)', () => {
  // With beta = 0 each pair is toggled by an independent Poisson(lambda/n) process, so it differs from its
  // start value at t = 1 with probability q = (1 - exp(-2 lambda / n)) / 2 (METHODS 7c, our derivation [O,V]).
  const n = 10;
  const lambda = 5;
  const q = (1 - Math.exp((-2 * lambda) / n)) / 2;
  const runs = 4000;

  it('E[C], E[L(1)], E[M(1)] from the empty network, and dE[C]/dlambda by the score function', () => {
    // METHODS 7c numbers: n=10, lambda=5 -> E[C] = 28.445425, dE[C]/dlambda = 3.310915; the simulator's
    // estimates are compared with these quoted values (not with formulas typed here).
    const expectedC = 28.445425;
    const expectedDerivative = 3.310915;
    const effects = zeroModel();
    const start = new NetworkState(n);
    const C = new Float64Array(runs);
    const M = new Float64Array(runs);
    const J = new Float64Array(runs);
    for (let r = 0; r < runs; r++) {
      const res = simulatePeriod({ start, rate: lambda, effects, params: [0, 0], rng: streamFor(7, r), collectScores: true });
      C[r] = hamming(start, res.end);
      M[r] = targetStatistics(res.end, effects)[1] / 2;
      J[r] = res.scores![0];
    }
    const c = meanVar(C);
    const m = meanVar(M);
    expect(Math.abs(c.mean - expectedC)).toBeLessThan(4 * Math.sqrt(c.variance / runs));
    expect(Math.abs(m.mean - ((n * (n - 1)) / 2) * q * q)).toBeLessThan(4 * Math.sqrt(m.variance / runs));
    // Score-function estimate of the derivative (Schweinberger & Snijders 2007): E[(C - EC) J_lambda].
    const prod = Float64Array.from(C, (v, r) => (v - c.mean) * J[r]);
    const d = meanVar(prod);
    expect(Math.abs(d.mean - expectedDerivative)).toBeLessThan(4 * Math.sqrt(d.variance / runs));
  });

  it('E[L(1)] from a non-empty start: L0 + (n(n-1) - 2 L0) q', () => {
    const effects = zeroModel();
    const start = randomNetwork(createRng(3), n, 0.3);
    const L0 = start.ties;
    const L = new Float64Array(runs);
    for (let r = 0; r < runs; r++) {
      L[r] = simulatePeriod({ start, rate: lambda, effects, params: [0, 0], rng: streamFor(8, r) }).end.ties;
    }
    const l = meanVar(L);
    expect(Math.abs(l.mean - (L0 + (n * (n - 1) - 2 * L0) * q))).toBeLessThan(4 * Math.sqrt(l.variance / runs));
  });

  it("the rate estimator's closed form: simulating at lambda-hat(c) reproduces c on average", () => {
    // METHODS 7c: lambda-hat = -(n/2) ln(1 - 2c/(n(n-1))); n=10, c=20 -> 2.938933.
    const c = 20;
    const lhat = -(n / 2) * Math.log(1 - (2 * c) / (n * (n - 1)));
    expect(lhat).toBeCloseTo(2.938933, 6);
    const effects = zeroModel();
    const start = randomNetwork(createRng(4), n, 0.2);
    const C = new Float64Array(runs);
    for (let r = 0; r < runs; r++) {
      C[r] = hamming(start, simulatePeriod({ start, rate: lhat, effects, params: [0, 0], rng: streamFor(9, r) }).end);
    }
    const s = meanVar(C);
    expect(Math.abs(s.mean - c)).toBeLessThan(4 * Math.sqrt(s.variance / runs));
  });
});

describe('simulator: ministep counts are Poisson (METHODS.md 7b; Poisson splitting, Norris 1997)', () => {
  it('per actor mean and variance equal lambda, the total is Poisson(n lambda), actors are uncorrelated', () => {
    const n = 8;
    const lambda = 3.5;
    const runs = 5000;
    const effects = buildEffects([{ id: 'density' }, { id: 'reciprocity' }, { id: 'transitive_triplets' }]);
    const start = randomNetwork(createRng(1), n, 0.3);
    const perActor = new Float64Array(n * runs);
    const total = new Float64Array(runs);
    let cross = 0;
    for (let r = 0; r < runs; r++) {
      const res = simulatePeriod({
        start, rate: lambda, effects, params: [-1, 1, 0.3], rng: streamFor(11, r), countPerActor: true,
      });
      total[r] = res.ministeps;
      let sum = 0;
      for (let i = 0; i < n; i++) {
        perActor[r * n + i] = res.actorMinisteps![i];
        sum += res.actorMinisteps![i];
      }
      expect(sum).toBe(res.ministeps);
      cross += (res.actorMinisteps![0] - lambda) * (res.actorMinisteps![1] - lambda);
    }
    const a = meanVar(perActor);
    const N = n * runs;
    // SE of the mean sqrt(lambda/N); SE of the sample variance about sqrt((lambda + 2 lambda^2)/N) for Poisson.
    expect(Math.abs(a.mean - lambda)).toBeLessThan(4 * Math.sqrt(lambda / N));
    expect(Math.abs(a.variance - lambda)).toBeLessThan(4 * Math.sqrt((lambda + 2 * lambda * lambda) / N));
    const t = meanVar(total);
    expect(Math.abs(t.mean - n * lambda)).toBeLessThan(4 * Math.sqrt((n * lambda) / runs));
    expect(Math.abs(t.variance - n * lambda)).toBeLessThan(4 * Math.sqrt((n * lambda + 2 * (n * lambda) ** 2) / runs));
    // Independence across actors: covariance of two actors' counts near 0 (SE lambda / sqrt(runs)).
    expect(Math.abs(cross / runs)).toBeLessThan((4 * lambda) / Math.sqrt(runs));
  });
});

describe('simulator: contract', () => {
  const effects = buildEffects([{ id: 'density' }, { id: 'reciprocity' }, { id: 'transitive_triplets' }, { id: 'three_cycles' }]);
  const params = Float64Array.of(-1.2, 1.1, 0.2, -0.1);

  it('same seed gives the same chain; different seeds differ; the start is not changed', () => {
    const start = randomNetwork(createRng(2), 25, 0.1);
    const before = Uint8Array.from(start.adj);
    const a = simulatePeriod({ start, rate: 6, effects, params, rng: createRng(99) });
    const b = simulatePeriod({ start, rate: 6, effects, params, rng: createRng(99) });
    const c = simulatePeriod({ start, rate: 6, effects, params, rng: createRng(100) });
    expect(Array.from(a.end.adj)).toEqual(Array.from(b.end.adj));
    expect(a.ministeps).toBe(b.ministeps);
    expect(a.changes).toBe(b.changes);
    expect(hamming(a.end, c.end)).toBeGreaterThan(0);
    expect(Array.from(start.adj)).toEqual(Array.from(before));
    // A Uint8Array start gives the same chain as the equivalent state.
    const d = simulatePeriod({ start: Uint8Array.from(start.adj), rate: 6, effects, params, rng: createRng(99) });
    expect(Array.from(d.end.adj)).toEqual(Array.from(a.end.adj));
  });

  it('uses exactly three uniforms per ministep plus one to end the period', () => {
    const start = randomNetwork(createRng(5), 12, 0.2);
    const rng = createRng(1234);
    const res = simulatePeriod({ start, rate: 3, effects, params, rng });
    const replay = createRng(1234);
    for (let k = 0; k < 3 * res.ministeps + 1; k++) replay.nextDouble();
    expect(Array.from(rng.getState())).toEqual(Array.from(replay.getState()));
  });

  it('the end state carries correct caches and the counts add up', () => {
    const start = randomNetwork(createRng(6), 15, 0.15);
    const res = simulatePeriod({ start, rate: 5, effects, params, rng: createRng(3) });
    const fresh = NetworkState.fromAdjacency(15, res.end.adj);
    expect(Array.from(res.end.p2!)).toEqual(Array.from(fresh.p2!));
    expect(Array.from(res.end.so!)).toEqual(Array.from(fresh.so!));
    expect(res.changes).toBeLessThanOrEqual(res.ministeps);
    expect(hamming(start, res.end)).toBeLessThanOrEqual(res.changes);
    expect((res.changes - hamming(start, res.end)) % 2).toBe(0);
  });

  it('never changes fixed pairs or the ties of absent actors; absent actors get no ministeps', () => {
    const n = 10;
    const start = randomNetwork(createRng(7), n, 0.3);
    const free = new Uint8Array(n * n).fill(1);
    for (let j = 0; j < n; j++) free[0 * n + j] = 0; // actor 0's outgoing pairs are fixed
    free[3 * n + 4] = 0;
    const active = new Uint8Array(n).fill(1);
    active[9] = 0;
    for (let r = 0; r < 200; r++) {
      const res = simulatePeriod({ start, rate: 4, effects, params, rng: streamFor(2, r), free, active, countPerActor: true });
      for (let j = 0; j < n; j++) expect(res.end.adj[j]).toBe(start.adj[j]);
      expect(res.end.adj[3 * n + 4]).toBe(start.adj[3 * n + 4]);
      for (let j = 0; j < n; j++) {
        expect(res.end.adj[9 * n + j]).toBe(start.adj[9 * n + j]);
        expect(res.end.adj[j * n + 9]).toBe(start.adj[j * n + 9]);
      }
      expect(res.actorMinisteps![9]).toBe(0);
    }
    const mask = new Uint8Array(n * n).fill(1);
    const other = start.clone();
    other.toggle(0, 1);
    other.toggle(2, 3);
    mask[0 * n + 1] = 0;
    expect(hamming(start, other)).toBe(2);
    expect(hamming(start, other, mask)).toBe(1);
  });

  it('survives extreme parameters without overflow (maximum subtracted before exponentiating)', () => {
    const start = randomNetwork(createRng(8), 12, 0.2);
    const full = simulatePeriod({ start, rate: 30, effects, params: [900, 0, 0, 0], rng: createRng(1) });
    expect(full.end.ties).toBe(12 * 11);
    const empty = simulatePeriod({ start, rate: 30, effects, params: [-900, 0, 0, 0], rng: createRng(1) });
    expect(empty.end.ties).toBe(0);
  });

  it('fails loudly at the ministep cap', () => {
    const start = new NetworkState(20);
    expect(() => simulatePeriod({ start, rate: 10, effects, params, rng: createRng(1), maxMinisteps: 50 })).toThrow(
      /simulate: reached the cap of 50 ministeps/,
    );
  });

  it('rejects bad input with clear messages', () => {
    const start = new NetworkState(5);
    const rng = createRng(1);
    expect(() => simulatePeriod({ start, rate: -1, effects, params, rng })).toThrow(/simulate: the rate must be a finite number >= 0/);
    expect(() => simulatePeriod({ start, rate: Number.NaN, effects, params, rng })).toThrow(/simulate: the rate/);
    expect(() => simulatePeriod({ start, rate: 1, effects, params: [1, 2], rng })).toThrow(/simulate: 4 effects but 2 parameters/);
    expect(() => simulatePeriod({ start, rate: 1, effects, params: [1, Number.POSITIVE_INFINITY, 0, 0], rng })).toThrow(
      /simulate: the parameter of reciprocity is not a finite number/,
    );
    expect(() => simulatePeriod({ start: new Uint8Array(8), rate: 1, effects, params, rng })).toThrow(/simulate: a start adjacency of length 8 is not square/);
    expect(() => simulatePeriod({ start, rate: 1, effects, params, rng, free: new Uint8Array(3) })).toThrow(/simulate: the pair mask has 3 entries/);
    const cov = buildEffects([{ id: 'covariate_alter', covariate: 'x' }], { x: Float64Array.of(1, 2, 3) });
    expect(() => simulatePeriod({ start, rate: 1, effects: cov, params: [1], rng })).toThrow(
      /simulate: covariate_alter:x describes 3 actors but the network has 5/,
    );
  });

  it('runs unchanged inside a worker thread and gives the same chain there', async () => {
    const n = 12;
    const start = randomNetwork(createRng(21), n, 0.2);
    const edges = start.edges();
    const local = simulatePeriod({
      start,
      rate: 4,
      effects: buildEffects([{ id: 'density' }, { id: 'reciprocity' }, { id: 'transitive_triplets' }]),
      params: [-1.5, 1, 0.2],
      rng: streamFor(5, 1, 2),
    });
    const remote = await new Promise<{ adj: Uint8Array; ministeps: number }>((resolve, reject) => {
      const worker = new Worker(path.resolve(__dirname, 'fixtures/worker-bootstrap.cjs'), {
        workerData: { n, edges, seed: 5, entry: path.resolve(__dirname, 'fixtures/simulate-worker.ts') },
      });
      worker.once('message', (m) => {
        resolve(m);
        void worker.terminate();
      });
      worker.once('error', reject);
    });
    expect(remote.ministeps).toBe(local.ministeps);
    expect(Array.from(remote.adj)).toEqual(Array.from(local.end.adj));
  });
});
