/** What a fit's worker receives (structured-cloneable): the covered periods, the spec and the plan. */
import type { FitPeriodData, StoredSpec } from './modelData';

export interface FitContext {
  fitId: number;
  n: number;
  seed: number;
  phase3Runs: number;
  spec: StoredSpec;
  periods: FitPeriodData[];
  /** Starting values by parameter key, carried over from an earlier fit (may be empty). */
  startValues: Record<string, number>;
  /** The earlier fit's Phase 3 derivative matrix when it estimated exactly the same parameters. */
  initialDerivative: number[][] | null;
}

export interface FitJobPayload {
  fitId: number;
  /** Number of estimated parameters. */
  p: number;
  phase3Runs: number;
  skipPhase1: boolean;
}

/** Plan stored in fits.plan. */
export interface StoredFitPlan {
  startValues: Record<string, number>;
  initialDerivative: number[][] | null;
}
