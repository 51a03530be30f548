/**
 * The goodness of fit of one period of a finished batch, every statistic at once: the GofResponse of
 * gofOf (envelopes and both Mahalanobis tests) and the simulated standard deviation per component
 * (the board's standardised charts). Pure: the same function runs in the GOF worker thread and, for
 * a batch whose GOF was never stored, once on the calling thread.
 */
import type { GofResponse } from '../../shared/batches';
import { layoutOffsets } from './layout';
import { gofOf, statisticSample } from './gof';
import type { LoadedBatch } from './service';

export interface StatisticGof {
  gof: GofResponse;
  /** Sample standard deviation (n - 1) of each component over the chains. */
  sd: number[];
}

/** How many chain matrices the GOF worker keeps (gofWorker.ts; mirrored by gofStore.ts). */
export const MATRICES_KEPT = 4;

export interface PeriodMatrix {
  chains: number;
  width: number;
  data: Float64Array;
}

/** What the computation needs of a batch (plain data, so it can be posted to a worker). */
export type GofBatch = Pick<LoadedBatch, 'model' | 'layout' | 'observed'> & { row: { id: number } };

/** Sample standard deviation (n - 1) of each column of a rows x cols matrix. */
export function columnSd(sample: { rows: number; cols: number; data: Float64Array }): number[] {
  const { rows, cols, data } = sample;
  const out: number[] = [];
  for (let k = 0; k < cols; k++) {
    let mean = 0;
    for (let s = 0; s < rows; s++) mean += data[s * cols + k];
    mean /= rows;
    let ss = 0;
    for (let s = 0; s < rows; s++) ss += (data[s * cols + k] - mean) ** 2;
    out.push(rows > 1 ? Math.sqrt(ss / (rows - 1)) : 0);
  }
  return out;
}

export function computePeriodGof(batch: GofBatch, matrix: PeriodMatrix, period: number, coverages: number[]): StatisticGof[] {
  const { offsets } = layoutOffsets(batch.layout);
  return batch.layout.map((layout) => {
    const offset = offsets.get(layout.statistic)!;
    const gof = gofOf(batch as LoadedBatch, matrix, { layout, offset }, period, coverages);
    return { gof, sd: columnSd(statisticSample(matrix, offset, layout.components.length)) };
  });
}
