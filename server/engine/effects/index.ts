/**
 * Effect registry: builds the list of Effect objects for a model specification.
 *
 * Purpose: map each effect id of shared/effects.ts to its implementation, attach covariates, and refuse
 * unusable specifications with a clear message.
 *
 * References:
 * - Snijders, T.A.B. (2001). The statistical evaluation of social network dynamics.
 *   Sociological Methodology 31, 361-395.
 * - Wavefit METHODS.md sections 1.5-1.7 and 2.1.
 */
import { EFFECT_IDS, effectInfo, isEffectId, type EffectId } from '../../../shared/effects';
import type { StateCaches } from '../state';
import { densityEffect, reciprocityEffect } from './basic';
import {
  covariateAlterEffect,
  covariateEgoEffect,
  covariateSimilarityEffect,
  sameCovariateEffect,
} from './covariate';
import { indegreePopularityEffect, outdegreeActivityEffect } from './degree';
import { threeCyclesEffect, transitiveTiesEffect, transitiveTripletsEffect } from './triadic';
import type { CovariateCentring, CovariateValues, Effect, EffectSpec } from './types';

export type { CovariateCentring, CovariateValues, Effect, EffectSpec, KernelTerm } from './types';
export { centreCovariate, covariateRange, similarityMean } from './covariate';

const STRUCTURAL: Partial<Record<EffectId, () => Effect>> = {
  density: densityEffect,
  reciprocity: reciprocityEffect,
  transitive_triplets: transitiveTripletsEffect,
  three_cycles: threeCyclesEffect,
  transitive_ties: transitiveTiesEffect,
  indegree_popularity: indegreePopularityEffect,
  outdegree_activity: outdegreeActivityEffect,
};

/**
 * Build the effects of a model, in the order given.
 *
 * @param specs effects with, for covariate effects, the name of their covariate
 * @param covariates numeric covariates as Float64Array (NaN = missing), categorical ones as Int32Array
 *   (codes >= 0, -1 = missing); every vector used must have the same length (the number of actors)
 * @param centring optional fixed mean / range / mean similarity per numeric covariate (for covariates
 *   that change between waves, METHODS.md 1.5); defaults come from the vector itself
 * @throws Error("effects: ...") for an unknown id, a missing covariate, a covariate of the wrong type,
 *   a covariate given to a structural effect, a duplicate effect, vectors of different lengths, a
 *   covariate with no observed value, or a similarity covariate whose range is 0
 */
export function buildEffects(
  specs: ReadonlyArray<EffectSpec>,
  covariates: Readonly<Record<string, CovariateValues>> = {},
  centring: Readonly<Record<string, CovariateCentring>> = {},
): Effect[] {
  const effects: Effect[] = [];
  const seen = new Set<string>();
  let actorCount: number | undefined;
  let actorCountFrom = '';
  specs.forEach((spec, position) => {
    const where = `effect ${position + 1}`;
    if (!spec || typeof spec.id !== 'string' || !isEffectId(spec.id)) {
      throw new Error(`effects: ${where} has unknown id "${String(spec?.id)}" (known: ${EFFECT_IDS.join(', ')})`);
    }
    const info = effectInfo(spec.id);
    let effect: Effect;
    if (info.covariate === 'none') {
      if (spec.covariate !== undefined) {
        throw new Error(`effects: ${spec.id} is structural and takes no covariate (got "${spec.covariate}")`);
      }
      effect = STRUCTURAL[spec.id]!();
    } else {
      const name = spec.covariate;
      if (name === undefined || name === '') {
        throw new Error(`effects: ${spec.id} needs a ${info.covariate} covariate; none was named`);
      }
      if (!Object.prototype.hasOwnProperty.call(covariates, name)) {
        const known = Object.keys(covariates);
        throw new Error(
          `effects: ${spec.id} names covariate "${name}", which is not given (known: ${known.length ? known.join(', ') : 'none'})`,
        );
      }
      const values = covariates[name];
      if (info.covariate === 'numeric') {
        if (!(values instanceof Float64Array)) {
          throw new Error(`effects: ${spec.id} needs a numeric covariate, but "${name}" is ${describe(values)}`);
        }
        const c = centring[name] ?? {};
        if (spec.id === 'covariate_ego') effect = covariateEgoEffect(name, values, c);
        else if (spec.id === 'covariate_alter') effect = covariateAlterEffect(name, values, c);
        else effect = covariateSimilarityEffect(name, values, c);
      } else {
        if (!(values instanceof Int32Array)) {
          throw new Error(`effects: ${spec.id} needs a categorical covariate, but "${name}" is ${describe(values)}`);
        }
        effect = sameCovariateEffect(name, values);
      }
      if (actorCount === undefined) {
        actorCount = values.length;
        actorCountFrom = name;
      } else if (values.length !== actorCount) {
        throw new Error(
          `effects: covariate "${name}" has ${values.length} values but "${actorCountFrom}" has ${actorCount}`,
        );
      }
    }
    if (seen.has(effect.key)) throw new Error(`effects: ${effect.key} appears twice in the model`);
    seen.add(effect.key);
    effects.push(effect);
  });
  return effects;
}

function describe(values: unknown): string {
  if (values instanceof Float64Array) return 'numeric';
  if (values instanceof Int32Array) return 'categorical';
  return 'neither a Float64Array nor an Int32Array';
}

/** The union of the caches a list of effects needs. */
export function cachesFor(effects: ReadonlyArray<Effect>): StateCaches {
  let twoPaths = false;
  let sharedOut = false;
  for (const e of effects) {
    if (e.needs.twoPaths) twoPaths = true;
    if (e.needs.sharedOut) sharedOut = true;
  }
  return { twoPaths, sharedOut };
}
