/**
 * Effect catalogue: the building blocks of a model's objective function.
 *
 * One list, read by the model form (labels, plain explanations, which covariate an effect needs)
 * and by the engine (server/engine/effects), which implements each id's change statistic and
 * target statistic as ../shared/METHODS.md section 2.1 defines them.
 *
 * Sources: Snijders (2001) The statistical evaluation of social network dynamics,
 * Sociological Methodology 31; Snijders, van de Bunt & Steglich (2010) Introduction to
 * stochastic actor-based models for network dynamics, Social Networks 32.
 *
 * Convention: indegree popularity and outdegree activity count ego's own tie
 * (s_i = sum_j x_ij x_+j and s_i = x_i+^2), as in the METHODS.md table.
 */

export const EFFECT_IDS = [
  'density',
  'reciprocity',
  'transitive_triplets',
  'three_cycles',
  'transitive_ties',
  'indegree_popularity',
  'outdegree_activity',
  'covariate_ego',
  'covariate_alter',
  'covariate_similarity',
  'same_covariate',
] as const;

export type EffectId = (typeof EFFECT_IDS)[number];

/** Which covariate an effect needs: none, a numeric one, or a categorical one. */
export type CovariateNeed = 'none' | 'numeric' | 'categorical';

export interface EffectInfo {
  id: EffectId;
  /** Short label for tables and charts. */
  label: string;
  kind: 'structural' | 'covariate';
  covariate: CovariateNeed;
  /** A plain explanation in our own words, shown in the model form. */
  explanation: string;
}

export const EFFECT_CATALOGUE: readonly EffectInfo[] = [
  {
    id: 'density',
    label: 'Density (outdegree)',
    kind: 'structural',
    covariate: 'none',
    explanation:
      'The baseline cost of naming someone. Usually negative: without other reasons, people keep few ties.',
  },
  {
    id: 'reciprocity',
    label: 'Reciprocity',
    kind: 'structural',
    covariate: 'none',
    explanation: 'Preference for naming the people who name you. Positive means ties tend to be returned.',
  },
  {
    id: 'transitive_triplets',
    label: 'Transitive triplets',
    kind: 'structural',
    covariate: 'none',
    explanation:
      'Preference for naming the contacts of your contacts, counted once for every shared go-between.',
  },
  {
    id: 'three_cycles',
    label: 'Three-cycles',
    kind: 'structural',
    covariate: 'none',
    explanation:
      'Preference for closing loops i→j→h→i. Often negative when ties follow a hierarchy.',
  },
  {
    id: 'transitive_ties',
    label: 'Transitive ties',
    kind: 'structural',
    covariate: 'none',
    explanation:
      'Preference for naming someone reachable through at least one go-between, however many there are.',
  },
  {
    id: 'indegree_popularity',
    label: 'Indegree popularity',
    kind: 'structural',
    covariate: 'none',
    explanation: 'Preference for naming people who are already named by many. Positive means the popular get more popular.',
  },
  {
    id: 'outdegree_activity',
    label: 'Outdegree activity',
    kind: 'structural',
    covariate: 'none',
    explanation: 'Whether people who already name many find it easier to name still more.',
  },
  {
    id: 'covariate_ego',
    label: 'Covariate ego',
    kind: 'covariate',
    covariate: 'numeric',
    explanation: 'Whether people with higher values of the attribute name more others.',
  },
  {
    id: 'covariate_alter',
    label: 'Covariate alter',
    kind: 'covariate',
    covariate: 'numeric',
    explanation: 'Whether people with higher values of the attribute are named more often.',
  },
  {
    id: 'covariate_similarity',
    label: 'Covariate similarity',
    kind: 'covariate',
    covariate: 'numeric',
    explanation: 'Preference for naming people whose attribute value is close to your own.',
  },
  {
    id: 'same_covariate',
    label: 'Same category',
    kind: 'covariate',
    covariate: 'categorical',
    explanation: 'Preference for naming people in the same category as you (same unit, same role, …).',
  },
];

export function effectInfo(id: EffectId): EffectInfo {
  const info = EFFECT_CATALOGUE.find((e) => e.id === id);
  if (!info) throw new Error(`effects: unknown effect id "${id}"`);
  return info;
}

export function isEffectId(value: string): value is EffectId {
  return (EFFECT_IDS as readonly string[]).includes(value);
}
