/**
 * Brute-force ego statistics s_i(x) of every effect of the catalogue, straight from their defining sums
 * (used by effects.test.ts and explore.test.ts).
 *
 * Source of the definitions: Snijders (2001), The statistical evaluation of social network dynamics,
 * Sociological Methodology 31; Snijders, van de Bunt & Steglich (2010), Introduction to stochastic
 * actor-based models for network dynamics, Social Networks 32; centring and similarity as in
 * Steglich, Snijders & Pearson (2010), Sociological Methodology 40 (as restated in METHODS.md 1.5-1.7, 2.1).
 */
import type { EffectId } from '../../shared/effects';
import type { NetworkState } from '../../server/engine/state';

export type Matrix = number[][];

export function matrixOf(state: NetworkState): Matrix {
  const { n, adj } = state;
  return Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => adj[i * n + j]));
}

/** Brute-force s_i(x) for one effect, straight from the defining sums. */
export function egoStatistic(id: EffectId, x: Matrix, i: number, cov: { num: number[]; cat: number[] }): number {
  const n = x.length;
  const sum = (f: (j: number) => number) => Array.from({ length: n }, (_, j) => f(j)).reduce((a, b) => a + b, 0);
  const obs = cov.num.filter((v) => !Number.isNaN(v));
  const mean = obs.reduce((a, b) => a + b, 0) / obs.length;
  const c = cov.num.map((v) => (Number.isNaN(v) ? 0 : v - mean));
  const range = Math.max(...obs) - Math.min(...obs);
  let simbar = 0;
  for (let a = 0; a < n; a++) for (let b = 0; b < n; b++) if (a !== b) simbar += 1 - Math.abs(c[a] - c[b]) / range;
  simbar /= n * (n - 1);
  switch (id) {
    case 'density':
      return sum((j) => x[i][j]);
    case 'reciprocity':
      return sum((j) => x[i][j] * x[j][i]);
    case 'transitive_triplets':
      return sum((j) => sum((h) => x[i][j] * x[i][h] * x[h][j]));
    case 'three_cycles':
      return sum((j) => sum((h) => x[i][j] * x[j][h] * x[h][i]));
    case 'transitive_ties':
      return sum((j) => x[i][j] * (sum((h) => x[i][h] * x[h][j]) > 0 ? 1 : 0));
    case 'indegree_popularity':
      return sum((j) => x[i][j] * sum((h) => x[h][j]));
    case 'outdegree_activity':
      return sum((j) => x[i][j]) ** 2;
    case 'covariate_ego':
      return c[i] * sum((j) => x[i][j]);
    case 'covariate_alter':
      return sum((j) => x[i][j] * c[j]);
    case 'covariate_similarity':
      return sum((j) => x[i][j] * (1 - Math.abs(c[i] - c[j]) / range - simbar));
    case 'same_covariate':
      return sum((j) => (cov.cat[i] >= 0 && cov.cat[i] === cov.cat[j] ? x[i][j] : 0));
  }
}

