/**
 * Consensus networks: tie frequencies, consensus at a threshold or top-L, and comparison with a wave.
 * See METHODS.md section 6.
 */
export { TieFrequencies } from './tieFrequencies';
export { consensusAtThreshold, consensusTopL, type PairMask } from './consensus';
export { compareNetworks, persistenceJaccard, type NetworkComparison } from './compare';
