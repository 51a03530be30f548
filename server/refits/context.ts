/** What a re-fit study's workers receive (structured-cloneable), and the stored copy of each chosen fit. */
import type { RefitModelInfo } from '../../shared/refits';
import type { FitPeriodData, StoredSpec } from '../models/modelData';

/** One chosen fit as the re-fit study stores it (refits.models): reproducible if the fit is removed. */
export interface StoredRefitModel {
  info: RefitModelInfo;
  spec: StoredSpec;
  /** The fit's Phase 3 derivative matrix (estimated parameters), or null (hand-entered values). */
  derivative: number[][] | null;
}

export interface RefitContext {
  refitId: number;
  seed: number;
  n: number;
  phase3Runs: number;
  models: StoredRefitModel[];
  /** The observed data of the periods the models cover (every model covers the same ones). */
  periods: FitPeriodData[];
}

/** One chunk = one re-fit: target model fitted to replication r of the panels simulated from source. */
export interface RefitChunk {
  source: number;
  target: number;
  replication: number;
}

export interface RefitChunkResult {
  finished: boolean;
  converged: boolean;
  maxAbsT: number | null;
  tauMax: number | null;
  estimates: Float64Array;
  ses: Float64Array;
  seconds: number;
  error: string | null;
}

export interface RefitJobPayload {
  refitId: number;
  models: number;
  replications: number;
  cross: boolean;
}
