/**
 * The goodness-of-fit numbers of a finished batch for the board's charts, the comparison and the
 * report: the batches module's stored GOF (server/batches/gofStore.ts, computed once in a worker
 * thread when the batch finished), plus the simulated standard deviation per component (for
 * standardised charts). Cached per batch: a finished batch's results never change.
 */
import type { DataSource } from 'typeorm';
import { chartScaleOf, type EnvelopeChartDto } from '../../shared/review';
import { DEFAULT_COVERAGES } from '../../shared/batches';
import { ALL_PERIODS, checkPeriodOrAll } from '../batches/gof';
import { gofStoreFor, type StatisticGof } from '../batches/gofStore';
import type { LoadedBatch } from '../batches/service';

export { columnSd } from '../batches/gofCompute';

/** A chart of one period (the board's cards, the comparison, the report). */
export type PeriodChartDto = EnvelopeChartDto & { period: number };

export class GofCache {
  private readonly entries = new Map<number, PeriodChartDto[]>();
  constructor(private readonly limit = 16) {}

  /** Every card of a done batch (period by period, in the batch's statistic order). */
  all(dataSource: DataSource, batch: LoadedBatch): PeriodChartDto[] {
    const hit = this.entries.get(batch.row.id);
    if (hit) return hit;
    const store = gofStoreFor(dataSource);
    const out: PeriodChartDto[] = [];
    for (const period of batch.summary.periods) {
      // Stored when the batch finished (computed in the GOF worker); computed here only for a batch
      // whose GOF was never stored and whose reader did not call prepare() first.
      for (const r of store.storedOrComputeHere(batch, period)) out.push(chartOf(batch, r, period));
    }
    if (this.entries.size >= this.limit) this.entries.delete(this.entries.keys().next().value!);
    this.entries.set(batch.row.id, out);
    return out;
  }

  /**
   * Every statistic's chart over all periods together (the stored 'all' rows, computed in the GOF
   * worker when missing); a 400 when the batch lacks one of the study's periods.
   */
  async together(dataSource: DataSource, batch: LoadedBatch): Promise<EnvelopeChartDto[]> {
    checkPeriodOrAll(batch, 'all');
    const results = await gofStoreFor(dataSource).period(batch, ALL_PERIODS, [...DEFAULT_COVERAGES]);
    return results.map((r) => chartOf(batch, r, 'all'));
  }

  /** Makes sure a done batch's GOF is stored, computing what is missing in the GOF worker thread. */
  async prepare(dataSource: DataSource, batch: LoadedBatch): Promise<void> {
    if (batch.summary.state === 'done' && !this.entries.has(batch.row.id)) await gofStoreFor(dataSource).ensure(batch);
  }

  one(dataSource: DataSource, batch: LoadedBatch, statistic: string, period: number): PeriodChartDto | undefined {
    return this.all(dataSource, batch).find((c) => c.statistic === statistic && c.period === period);
  }
}

function chartOf<P extends number | 'all'>(batch: LoadedBatch, { gof: g, sd }: StatisticGof, period: P): EnvelopeChartDto & { period: P } {
  return {
          batchId: batch.row.id,
          statistic: g.statistic,
          label: g.label,
          period,
          components: g.components,
          observed: g.observed,
          mean: g.mean,
          sd,
          bands: g.bands.map((b) => ({ coverage: b.coverage, lower: b.lower, upper: b.upper, outside: b.outside })),
          pValue: g.test.pValue,
          pValueSimulatedOnly: g.test.pValueSimulatedOnly,
          distance: g.test.distance,
          chains: g.test.chains,
          outOfSupport: g.test.outOfSupport,
          reading: g.reading,
          caution: g.caution,
          scale: chartScaleOf(g.statistic),
  };
}
