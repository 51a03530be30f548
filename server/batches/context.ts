/** What a batch's workers receive once per job (structured-cloneable), and one chunk's work and result. */
import type { AuxStatisticId } from '../../shared/auxStatistics';
import type { CovariateCentring, CovariateValues, EffectSpec } from '../engine/effects';

export interface BatchPeriodContext {
  period: number;
  rate: number;
  start: Uint8Array;
  /** Observed end with missing pairs imputed: its values are written into simulated ends where endMissing is 1. */
  end: Uint8Array;
  endMissing: Uint8Array | null;
  /** Pair mask (1 free, 0 fixed) and actor mask (1 active) of the period; null when all are free / active. */
  free?: Uint8Array | null;
  active?: Uint8Array | null;
  covariates: Record<string, CovariateValues>;
  centring: Record<string, CovariateCentring>;
}

export interface BatchContext {
  batchId: number;
  seed: number;
  n: number;
  statistics: AuxStatisticId[];
  maxDegree: number;
  maxDistance: number;
  /** Components per stored row (sum over statistics). */
  width: number;
  effects: EffectSpec[];
  params: number[];
  periods: BatchPeriodContext[];
}

export interface BatchChunk {
  firstChain: number;
  chains: number;
}

export interface BatchChunkPeriodResult {
  period: number;
  /** chains x width, row-major. */
  rows: Float64Array;
  /** Tie counts of the simulated end networks (before the missing-pair overwrite), n x n. */
  counts: Int32Array;
  tieTotal: number;
}

export interface BatchChunkResult {
  periods: BatchChunkPeriodResult[];
}
