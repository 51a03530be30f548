/**
 * Data simulated from known parameters for the recovery test and the benchmark: a numeric covariate
 * (years of service, 1..5 drawn uniformly), a first wave drawn by a long burn-in period from a sparse
 * random network (so it is near the model's own stationary state), then the later waves simulated from
 * each other with the engine's simulatePeriod.
 */
import { buildEffects, type Effect } from '../../server/engine/effects';
import { createRng } from '../../server/engine/prng';
import { simulatePeriod } from '../../server/engine/simulate';
import { NetworkState } from '../../server/engine/state';
import type { PeriodInput } from '../../server/engine/estimate';

export const TRUE_BETA = [-2, 1.5, 0.3, 1.0];
export const TRUE_EFFECTS = ['density', 'reciprocity', 'transitive_triplets', 'covariate_similarity'] as const;

export interface SimulatedPanel {
  n: number;
  effects: Effect[];
  periods: PeriodInput[];
  waves: Uint8Array[];
}

export interface PanelOptions {
  waves?: number;
  rate?: number;
  beta?: number[];
  /** The triadic effect (default transitive triplets). */
  triad?: 'transitive_triplets' | 'three_cycles';
  /** The covariate effect on years of service (default similarity). */
  covariateEffect?: 'covariate_similarity' | 'covariate_ego' | 'covariate_alter';
}

export function simulatedPanel(n: number, seed: number, options: PanelOptions = {}): SimulatedPanel {
  const beta = options.beta ?? TRUE_BETA;
  const rate = options.rate ?? 4;
  const waveCount = options.waves ?? 3;
  const rng = createRng(seed);
  const years = new Float64Array(n);
  for (let i = 0; i < n; i++) years[i] = 1 + rng.nextInt(5);
  const effects = buildEffects(
    [
      { id: 'density' },
      { id: 'reciprocity' },
      { id: options.triad ?? 'transitive_triplets' },
      { id: options.covariateEffect ?? 'covariate_similarity', covariate: 'years' },
    ],
    { years },
  );
  const first = new Uint8Array(n * n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) if (i !== j && rng.nextDouble() < 0.1) first[i * n + j] = 1;
  let state: NetworkState = simulatePeriod({ start: first, rate: 20, effects, params: beta, rng }).end;
  const waves = [Uint8Array.from(state.adj)];
  for (let m = 1; m < waveCount; m++) {
    state = simulatePeriod({ start: state, rate, effects, params: beta, rng }).end;
    waves.push(Uint8Array.from(state.adj));
  }
  const periods = waves.slice(0, -1).map((w, m) => ({ start: w, end: waves[m + 1], effects }));
  return { n, effects, periods, waves };
}
