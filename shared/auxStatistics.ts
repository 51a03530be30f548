/**
 * Auxiliary statistics: features of a network the model was not fitted to, used for goodness of fit.
 * Ids and labels live here so the server (computation, storage) and the client (board) agree.
 *
 * Sources: Lospinoso & Snijders (2019) Goodness of fit for stochastic actor-oriented models,
 * Methodological Innovations 12(3); Holland & Leinhardt (1976) Local structure in social networks;
 * Wasserman & Faust (1994) Social Network Analysis, ch. 13-14.
 */

export const AUX_STATISTIC_IDS = [
  'outdegree_distribution',
  'indegree_distribution',
  'triad_census',
  'dyad_census',
  'geodesic_distribution',
] as const;

export type AuxStatisticId = (typeof AUX_STATISTIC_IDS)[number];

/** The 16 standard triad type labels (Holland & Leinhardt 1970), in the conventional order. */
export const TRIAD_TYPES = [
  '003', '012', '102', '021D', '021U', '021C', '111D', '111U',
  '030T', '030C', '201', '120D', '120U', '120C', '210', '300',
] as const;

export type TriadType = (typeof TRIAD_TYPES)[number];

export interface AuxStatisticInfo {
  id: AuxStatisticId;
  label: string;
  /** What one component of the vector means, in plain words. */
  explanation: string;
}

export const AUX_STATISTIC_CATALOGUE: readonly AuxStatisticInfo[] = [
  {
    id: 'outdegree_distribution',
    label: 'Outdegree distribution',
    explanation: 'For each k, how many actors name at most k others (cumulative).',
  },
  {
    id: 'indegree_distribution',
    label: 'Indegree distribution',
    explanation: 'For each k, how many actors are named by at most k others (cumulative).',
  },
  {
    id: 'triad_census',
    label: 'Triad census',
    explanation: 'How many triples of actors fall in each of the 16 standard triad types.',
  },
  {
    id: 'dyad_census',
    label: 'Dyad census and reciprocity',
    explanation: 'Mutual, asymmetric and null pairs, and the share of ties that are returned.',
  },
  {
    id: 'geodesic_distribution',
    label: 'Distances',
    explanation: 'For each k, how many ordered pairs are at most k steps apart; the last entry counts pairs with no path.',
  },
];

export function isAuxStatisticId(value: string): value is AuxStatisticId {
  return (AUX_STATISTIC_IDS as readonly string[]).includes(value);
}
