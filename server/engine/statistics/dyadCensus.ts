/**
 * Dyad census: mutual, asymmetric and null dyads, and the reciprocity index 2M / L.
 *
 * Purpose: auxiliary statistic (and a convergence check when reciprocity is in the model).
 *
 * References:
 * - Holland, P.W. & Leinhardt, S. (1970). A method for detecting structure in sociometric data.
 *   American Journal of Sociology 76, 492-513.
 * - Wasserman, S. & Faust, K. (1994). Social Network Analysis, ch. 13.
 * - Wavefit METHODS.md sections 5 and 7d (M + A + N = C(n,2), 2M + A = L).
 */
import type { NetworkState } from '../state';

export interface DyadCensus {
  mutual: number;
  asymmetric: number;
  null: number;
  /** 2M / L; 0 for a network without ties (our convention; the index is undefined there). */
  reciprocity: number;
}

export function dyadCensus(state: NetworkState): DyadCensus {
  const { n, adj, adjT } = state;
  let both = 0; // ordered pairs with both ties = 2M
  let ties = 0;
  for (let k = 0; k < n * n; k++) {
    ties += adj[k];
    both += adj[k] & adjT[k];
  }
  const mutual = both / 2;
  const asymmetric = ties - both;
  const pairs = n < 2 ? 0 : (n * (n - 1)) / 2;
  return { mutual, asymmetric, null: pairs - mutual - asymmetric, reciprocity: ties > 0 ? both / ties : 0 };
}
