/**
 * Checks of the generated utility loop (server/engine/kernel.ts): the utilities of a mixture of effects
 * equal sum_k beta_k delta_ijk, with each effect's change statistic delta_ijk (itself checked against
 * brute-force sums of the defining statistics in effects.test.ts; definitions from Snijders 2001,
 * The statistical evaluation of social network dynamics, Sociological Methodology 31, as restated in
 * METHODS.md 2.1). The simulator's two routes (kernel, and effect-by-effect rows when scores are
 * collected) must give the same chains.
 */
import { describe, expect, it } from 'vitest';
import { EFFECT_IDS, effectInfo } from '../../shared/effects';
import { buildEffects, type Effect } from '../../server/engine/effects';
import { compileUtilityKernel, kernelSource } from '../../server/engine/kernel';
import { streamFor } from '../../server/engine/prng';
import { simulatePeriod } from '../../server/engine/simulate';
import { createRng, randomReciprocalNetwork } from './helpers';

function catalogue(n: number, rng: ReturnType<typeof createRng>): Effect[] {
  const age = Float64Array.from({ length: n }, () => (rng.nextDouble() < 0.15 ? Number.NaN : Math.round(rng.nextDouble() * 30)));
  age[0] = 2;
  age[1] = 25;
  const unit = Int32Array.from({ length: n }, () => (rng.nextDouble() < 0.15 ? -1 : rng.nextInt(3)));
  const specs = EFFECT_IDS.map((id) => {
    const need = effectInfo(id).covariate;
    return need === 'none' ? { id } : { id, covariate: need === 'numeric' ? 'age' : 'unit' };
  });
  return buildEffects(specs, { age, unit });
}

describe('utility kernel', () => {
  it('equals sum_k beta_k delta_ijk for random mixtures of the catalogue, with u_i = 0 and the maximum returned', () => {
    const rng = createRng(404);
    let checked = 0;
    for (const n of [3, 8, 21, 40]) {
      const effects = catalogue(n, rng);
      for (let rep = 0; rep < 6; rep++) {
        const state = randomReciprocalNetwork(rng, n, 0.1 + 0.7 * rng.nextDouble(), 0.4);
        // A random subset of the effects that have a kernel term, with random parameters (some zero).
        const params = effects.map(() => (rng.nextDouble() < 0.2 ? 0 : 4 * rng.nextDouble() - 2));
        const use = effects.map((e, k) => (e.kernel !== undefined && rng.nextDouble() < 0.7 ? k : -1)).filter((k) => k >= 0);
        const kernel = compileUtilityKernel(effects, params, use);
        const u = new Float64Array(n).fill(Number.NaN);
        for (let i = 0; i < n; i++) {
          const max = kernel(state, i, u);
          expect(u[i]).toBe(0);
          let expectedMax = 0;
          for (let j = 0; j < n; j++) {
            if (j === i) continue;
            let expected = 0;
            for (const k of use) expected += params[k] * effects[k].change(state, i, j);
            expect(u[j]).toBeCloseTo(expected, 10);
            expectedMax = Math.max(expectedMax, u[j]);
            checked++;
          }
          expect(max).toBe(expectedMax);
        }
      }
    }
    expect(checked).toBeGreaterThan(10000);
  });

  it('takes new parameters and new covariate values without reusing old ones (one compiled loop, many calls)', () => {
    const rng = createRng(9);
    const n = 12;
    const state = randomReciprocalNetwork(rng, n, 0.3, 0.5);
    const a = buildEffects([{ id: 'density' }, { id: 'covariate_alter', covariate: 'c' }], { c: Float64Array.from({ length: n }, (_, k) => k) });
    const b = buildEffects([{ id: 'density' }, { id: 'covariate_alter', covariate: 'c' }], { c: Float64Array.from({ length: n }, (_, k) => (k * 7) % 5) });
    for (const [effects, params] of [[a, [-1, 0.3]], [a, [0.5, -0.2]], [b, [-1, 0.3]]] as const) {
      const u = new Float64Array(n);
      compileUtilityKernel(effects, params, [0, 1])(state, 4, u);
      for (let j = 0; j < n; j++) {
        if (j !== 4) expect(u[j]).toBeCloseTo(params[0] * effects[0].change(state, 4, j) + params[1] * effects[1].change(state, 4, j), 12);
      }
    }
  });

  it('refuses an effect without a kernel term and a snippet that could break out of the loop, with clear messages', () => {
    const [ties] = buildEffects([{ id: 'transitive_ties' }]);
    expect(() => compileUtilityKernel([ties], [1], [0])).toThrow(/kernel: transitive_ties has no kernel term/);
    expect(() => kernelSource([{ key: 'bad', term: { pair: '0 } ; { 1' } }])).toThrow(/kernel: the snippet of bad contains characters/);
    expect(() => kernelSource([{ key: 'bad', term: { data: { 'a-b': 1 } } }])).toThrow(/kernel: bad has a data field with an unusable name/);
  });

  it('the simulator gives the same chains through the kernel and through the effect rows (scores collected)', () => {
    const rng = createRng(77);
    const n = 15;
    const effects = catalogue(n, rng); // transitive ties included: accumulated after the kernel
    const params = effects.map((e) => (e.id === 'density' ? -1.2 : 0.6 * rng.nextDouble() - 0.3));
    const start = randomReciprocalNetwork(rng, n, 0.2, 0.5);
    for (let chain = 0; chain < 40; chain++) {
      const fast = simulatePeriod({ start, rate: 4, effects, params, rng: streamFor(5, chain) });
      const rows = simulatePeriod({ start, rate: 4, effects, params, rng: streamFor(5, chain), collectScores: true });
      expect(fast.ministeps).toBe(rows.ministeps);
      expect(Array.from(fast.end.adj)).toEqual(Array.from(rows.end.adj));
    }
  });
});
