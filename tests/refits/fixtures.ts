/**
 * A re-fit study's worker context built in the test's own thread, without a database: a first wave
 * drawn by a long burn-in from a sparse random network (near the model's stationary state), and
 * models given as hand-entered values (known parameters).
 */
import { createRng } from '../../server/engine/prng';
import { buildEffects } from '../../server/engine/effects';
import { simulatePeriod } from '../../server/engine/simulate';
import type { RefitContext, StoredRefitModel } from '../../server/refits/context';
import { parameterLabel } from '../../shared/models';

export interface KnownModel {
  name: string;
  rates: number[];
  effects: { id: 'density' | 'reciprocity' | 'transitive_triplets'; value: number }[];
}

export function storedModel(m: KnownModel, fitId: number): StoredRefitModel {
  const keys = [...m.rates.map((_, k) => `rate:${k + 1}`), ...m.effects.map((e) => e.id)];
  return {
    info: {
      fitId,
      modelId: fitId,
      name: m.name,
      keys,
      labels: keys.map(parameterLabel),
      values: [...m.rates, ...m.effects.map((e) => e.value)],
      estimated: keys.map(() => true),
      converged: true,
      handEntered: true,
    },
    spec: {
      rates: m.rates.map((value, k) => ({ period: k + 1, estimate: true, value })),
      effects: m.effects.map((e) => ({ id: e.id, estimate: true, value: e.value })),
    },
    derivative: null,
  };
}

/** n actors, one observed first wave from the burn-in of `generator`; end waves are never read by a re-fit. */
export function knownContext(n: number, periods: number, models: KnownModel[], seed: number, generator = models[0]): RefitContext {
  const rng = createRng(seed);
  const effects = buildEffects(generator.effects.map((e) => ({ id: e.id })));
  const sparse = new Uint8Array(n * n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) if (i !== j && rng.nextDouble() < 0.1) sparse[i * n + j] = 1;
  const first = simulatePeriod({ start: sparse, rate: 25, effects, params: generator.effects.map((e) => e.value), rng }).end;
  return {
    refitId: 1,
    seed: seed * 7 + 1,
    n,
    phase3Runs: 300,
    models: models.map((m, k) => storedModel(m, k + 1)),
    periods: Array.from({ length: periods }, (_, k) => ({
      period: k + 1,
      label: `wave ${k + 1} to wave ${k + 2}`,
      start: Uint8Array.from(first.adj),
      end: Uint8Array.from(first.adj),
      endMissing: null,
      free: null,
      active: null,
      covariates: {},
      centring: {},
    })),
  };
}
