/**
 * The goodness-of-fit numbers of a finished batch for the board's charts, the comparison and the
 * report, computed by the batches module's own functions (periodMatrix, statisticSample, gofOf) from
 * the stored rows, plus the simulated standard deviation per component (for standardised charts).
 * Cached per batch: a finished batch's results never change.
 */
import type { DataSource } from 'typeorm';
import { DEFAULT_COVERAGES } from '../../shared/batches';
import { chartScaleOf, type EnvelopeChartDto } from '../../shared/review';
import { layoutOffsets } from '../batches/layout';
import { gofOf, periodMatrix, statisticSample } from '../batches/gof';
import type { LoadedBatch } from '../batches/service';

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

export class GofCache {
  private readonly entries = new Map<number, EnvelopeChartDto[]>();
  constructor(private readonly limit = 16) {}

  /** Every card of a done batch (period by period, in the batch's statistic order). */
  all(dataSource: DataSource, batch: LoadedBatch): EnvelopeChartDto[] {
    const hit = this.entries.get(batch.row.id);
    if (hit) return hit;
    const { offsets } = layoutOffsets(batch.layout);
    const out: EnvelopeChartDto[] = [];
    for (const period of batch.summary.periods) {
      const matrix = periodMatrix(dataSource, batch, period);
      for (const layout of batch.layout) {
        const offset = offsets.get(layout.statistic)!;
        const g = gofOf(batch, matrix, { layout, offset }, period, [...DEFAULT_COVERAGES]);
        out.push({
          batchId: batch.row.id,
          statistic: g.statistic,
          label: g.label,
          period,
          components: g.components,
          observed: g.observed,
          mean: g.mean,
          sd: columnSd(statisticSample(matrix, offset, layout.components.length)),
          bands: g.bands.map((b) => ({ coverage: b.coverage, lower: b.lower, upper: b.upper, outside: b.outside })),
          pValue: g.test.pValue,
          pValueSimulatedOnly: g.test.pValueSimulatedOnly,
          distance: g.test.distance,
          chains: g.test.chains,
          outOfSupport: g.test.outOfSupport,
          reading: g.reading,
          caution: g.caution,
          scale: chartScaleOf(g.statistic),
        });
      }
    }
    if (this.entries.size >= this.limit) this.entries.delete(this.entries.keys().next().value!);
    this.entries.set(batch.row.id, out);
    return out;
  }

  one(dataSource: DataSource, batch: LoadedBatch, statistic: string, period: number): EnvelopeChartDto | undefined {
    return this.all(dataSource, batch).find((c) => c.statistic === statistic && c.period === period);
  }
}
