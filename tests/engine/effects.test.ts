/**
 * Checks of the effects (server/engine/effects): change statistics, the row form, the generated-loop form
 * (server/engine/kernel.ts) and the network totals against brute-force evaluation of each actor's statistic s_i from its defining sum.
 *
 * Source of the definitions: Snijders (2001), The statistical evaluation of social network dynamics,
 * Sociological Methodology 31; Snijders, van de Bunt & Steglich (2010), Introduction to stochastic
 * actor-based models for network dynamics, Social Networks 32; centring and similarity as in
 * Steglich, Snijders & Pearson (2010), Sociological Methodology 40 (as restated in METHODS.md 1.5-1.7, 2.1).
 */
import { describe, expect, it } from 'vitest';
import { EFFECT_IDS, effectInfo, type EffectId } from '../../shared/effects';
import { buildEffects, type Effect } from '../../server/engine/effects';
import { compileUtilityKernel } from '../../server/engine/kernel';
import { NetworkState, NO_CACHES } from '../../server/engine/state';
import { egoStatistic, matrixOf } from './egoStatistics';
import { createRng, randomReciprocalNetwork } from './helpers';

function allSpecs(): { id: EffectId; covariate?: string }[] {
  return EFFECT_IDS.map((id) => {
    const need = effectInfo(id).covariate;
    return need === 'none' ? { id } : { id, covariate: need === 'numeric' ? 'age' : 'unit' };
  });
}

describe('effects: change statistics and targets against brute force', () => {
  it('every effect of the catalogue, on random networks with covariates (missing values included)', () => {
    const rng = createRng(31);
    let checked = 0;
    for (const n of [2, 3, 4, 6, 9]) {
      for (const [p, q] of [[0.2, 0.3], [0.5, 0.6], [0.8, 0.5]]) {
        const state = randomReciprocalNetwork(rng, n, p, q);
        const num = Array.from({ length: n }, () => (rng.nextDouble() < 0.15 ? Number.NaN : Math.round(rng.nextDouble() * 40) / 4));
        num[0] = 1;
        num[n - 1] = 7.5; // a non-zero range
        const cat = Array.from({ length: n }, () => (rng.nextDouble() < 0.15 ? -1 : rng.nextInt(3)));
        const cov = { num, cat };
        const effects = buildEffects(allSpecs(), { age: Float64Array.from(num), unit: Int32Array.from(cat) });
        const x = matrixOf(state);
        const bare = state.clone(NO_CACHES);
        for (const effect of effects) {
          const total = x.reduce((acc, _row, i) => acc + egoStatistic(effect.id, x, i, cov), 0);
          expect(effect.statistic(state)).toBeCloseTo(total, 9);
          expect(effect.statistic(bare)).toBeCloseTo(total, 9);
          for (let i = 0; i < n; i++) {
            const row = new Float64Array(n);
            effect.accumulate(state, i, 1.5, row);
            // The generated-loop form (server/engine/kernel.ts) of this effect alone, parameter 1.5.
            const fused = new Float64Array(n).fill(Number.NaN);
            const fusedMax = effect.kernel ? compileUtilityKernel([effect], [1.5], [0])(state, i, fused) : 0;
            if (effect.kernel) {
              expect(fused[i]).toBe(0);
              expect(fusedMax).toBe(Math.max(0, ...fused));
            }
            const before = egoStatistic(effect.id, x, i, cov);
            for (let j = 0; j < n; j++) {
              if (j === i) continue;
              x[i][j] = 1 - x[i][j];
              const delta = egoStatistic(effect.id, x, i, cov) - before;
              x[i][j] = 1 - x[i][j];
              expect(effect.change(state, i, j)).toBeCloseTo(delta, 9);
              expect(row[j]).toBeCloseTo(1.5 * delta, 9);
              if (effect.kernel) expect(fused[j]).toBeCloseTo(1.5 * delta, 9);
              checked++;
            }
          }
        }
      }
    }
    expect(checked).toBeGreaterThan(3000);
  });

  it('target statistic before and after a toggle: its difference is the sum of all actors\' changes', () => {
    // Consistency of change and target (METHODS 2.1): toggling i->j changes the total sum_h s_h by
    // delta_ij (ego i's part) plus the changes of other actors' s_h. For density, activity and the
    // covariate effects only ego's statistic involves x_ij, so the total moves by exactly delta_ij;
    // for the others the remainder is checked against brute force.
    const rng = createRng(77);
    const n = 7;
    const num = Array.from({ length: n }, (_, k) => (k === 2 ? Number.NaN : k * 1.5 + rng.nextDouble()));
    const cat = Array.from({ length: n }, () => rng.nextInt(3));
    const cov = { num, cat };
    const effects = buildEffects(allSpecs(), { age: Float64Array.from(num), unit: Int32Array.from(cat) });
    const egoOnly = new Set<EffectId>(['density', 'outdegree_activity', 'covariate_ego', 'covariate_alter', 'covariate_similarity', 'same_covariate']);
    for (let rep = 0; rep < 40; rep++) {
      const state = randomReciprocalNetwork(rng, n, 0.35, 0.4);
      const i = rng.nextInt(n);
      let j = rng.nextInt(n - 1);
      if (j >= i) j++;
      const before = effects.map((e) => e.statistic(state));
      const changes = effects.map((e) => e.change(state, i, j));
      const x0 = matrixOf(state);
      state.toggle(i, j);
      const x1 = matrixOf(state);
      effects.forEach((e, k) => {
        const diff = e.statistic(state) - before[k];
        let others = 0;
        for (let h = 0; h < n; h++) if (h !== i) others += egoStatistic(e.id, x1, h, cov) - egoStatistic(e.id, x0, h, cov);
        expect(diff).toBeCloseTo(changes[k] + others, 9);
        if (egoOnly.has(e.id)) expect(diff).toBeCloseTo(changes[k], 9);
      });
    }
  });

  it('change statistics stay right while the simulator-style toggles update the caches', () => {
    const rng = createRng(8);
    const n = 8;
    const state = randomReciprocalNetwork(rng, n, 0.3, 0.4);
    const effects = buildEffects([{ id: 'transitive_triplets' }, { id: 'three_cycles' }, { id: 'transitive_ties' }]);
    const cov = { num: [0, 1], cat: [] as number[] };
    for (let step = 0; step < 60; step++) {
      const i = rng.nextInt(n);
      let j = rng.nextInt(n - 1);
      if (j >= i) j++;
      state.toggle(i, j);
      const x = matrixOf(state);
      const a = rng.nextInt(n);
      let b = rng.nextInt(n - 1);
      if (b >= a) b++;
      for (const e of effects) {
        const before = egoStatistic(e.id, x, a, cov);
        x[a][b] = 1 - x[a][b];
        const after = egoStatistic(e.id, x, a, cov);
        x[a][b] = 1 - x[a][b];
        expect(e.change(state, a, b)).toBeCloseTo(after - before, 12);
      }
    }
  });

  it('the two identities linking triad-based targets to the triad census hold (METHODS 5, checked there with networkx)', async () => {
    const { triadCensus } = await import('../../server/engine/statistics');
    const rng = createRng(12);
    const [tt, tc] = buildEffects([{ id: 'transitive_triplets' }, { id: 'three_cycles' }]);
    for (let rep = 0; rep < 10; rep++) {
      const s = randomReciprocalNetwork(rng, 12, 0.3, 0.4);
      const c = triadCensus(s);
      const at = (label: string) => c[['003', '012', '102', '021D', '021U', '021C', '111D', '111U', '030T', '030C', '201', '120D', '120U', '120C', '210', '300'].indexOf(label)];
      expect(tt.statistic(s)).toBe(at('030T') + 2 * at('120D') + 2 * at('120U') + at('120C') + 3 * at('210') + 6 * at('300'));
      expect(tc.statistic(s)).toBe(3 * (at('030C') + at('120C') + at('210')) + 6 * at('300'));
    }
  });
});

describe('effects: building a model', () => {
  const age = Float64Array.of(20, 30, Number.NaN, 40);
  const unit = Int32Array.of(0, 1, 1, -1);

  it('keeps the order, keys and labels of the specification', () => {
    const effects: Effect[] = buildEffects(
      [{ id: 'density' }, { id: 'covariate_alter', covariate: 'age' }, { id: 'same_covariate', covariate: 'unit' }],
      { age, unit },
    );
    expect(effects.map((e) => e.key)).toEqual(['density', 'covariate_alter:age', 'same_covariate:unit']);
    expect(effects[1].actorCount).toBe(4);
    expect(effects[1].label).toContain('age');
  });

  it('centres on the observed mean, with missing values at 0 (METHODS 1.5)', () => {
    const [ego] = buildEffects([{ id: 'covariate_ego', covariate: 'age' }], { age });
    const s = NetworkState.fromEdges(4, [[0, 1], [2, 1], [3, 0], [3, 2]]);
    // mean of 20, 30, 40 = 30: centred -10, 0, (missing) 0, 10; total = -10*1 + 0 + 0*1 + 10*2 = 10
    expect(ego.statistic(s)).toBe(10);
    const [fixed] = buildEffects([{ id: 'covariate_ego', covariate: 'age' }], { age }, { age: { mean: 25 } });
    // centred -5, 5, 0, 15: total = -5 + 0 + 30 = 25
    expect(fixed.statistic(s)).toBe(25);
  });

  it('refuses unusable specifications with clear messages', () => {
    expect(() => buildEffects([{ id: 'popularity' as EffectId }])).toThrow(/effects: effect 1 has unknown id "popularity"/);
    expect(() => buildEffects([{ id: 'covariate_ego' }], { age })).toThrow(/effects: covariate_ego needs a numeric covariate; none was named/);
    expect(() => buildEffects([{ id: 'covariate_ego', covariate: 'height' }], { age })).toThrow(
      /effects: covariate_ego names covariate "height", which is not given \(known: age\)/,
    );
    expect(() => buildEffects([{ id: 'covariate_alter', covariate: 'unit' }], { unit })).toThrow(
      /effects: covariate_alter needs a numeric covariate, but "unit" is categorical/,
    );
    expect(() => buildEffects([{ id: 'same_covariate', covariate: 'age' }], { age })).toThrow(
      /effects: same_covariate needs a categorical covariate, but "age" is numeric/,
    );
    expect(() => buildEffects([{ id: 'density', covariate: 'age' }], { age })).toThrow(/effects: density is structural and takes no covariate/);
    expect(() => buildEffects([{ id: 'density' }, { id: 'density' }])).toThrow(/effects: density appears twice/);
    expect(() =>
      buildEffects([{ id: 'covariate_similarity', covariate: 'flat' }], { flat: Float64Array.of(3, 3, Number.NaN) }),
    ).toThrow(/effects: covariate_similarity needs covariate "flat" to take at least two different values \(its range is 0\)/);
    expect(() => buildEffects([{ id: 'covariate_ego', covariate: 'none' }], { none: Float64Array.of(Number.NaN, Number.NaN) })).toThrow(
      /effects: covariate "none" has no observed values/,
    );
    expect(() =>
      buildEffects(
        [{ id: 'covariate_ego', covariate: 'age' }, { id: 'same_covariate', covariate: 'short' }],
        { age, short: Int32Array.of(0, 1) },
      ),
    ).toThrow(/effects: covariate "short" has 2 values but "age" has 4/);
    expect(() => buildEffects([{ id: 'same_covariate', covariate: 'bad' }], { bad: Int32Array.of(0, -2) })).toThrow(
      /effects: categorical covariate "bad" has code -2/,
    );
  });

  it('triadic effects refuse a state without the caches they need', () => {
    const [tt] = buildEffects([{ id: 'transitive_triplets' }]);
    const bare = NetworkState.fromEdges(3, [[0, 1]], NO_CACHES);
    expect(() => tt.change(bare, 0, 2)).toThrow(/effects: transitive_triplets needs a network state that keeps two-path counts/);
  });
});
