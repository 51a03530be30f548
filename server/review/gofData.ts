/**
 * The goodness-of-fit numbers of a finished batch for the board's charts, the comparison and the
 * report: the batches module's stored GOF (server/batches/gofStore.ts, computed once in a worker
 * thread when the batch finished), plus the simulated standard deviation per component (for
 * standardised charts). Cached per batch: a finished batch's results never change.
 */
import type { DataSource } from 'typeorm';
import { chartScaleOf, type EnvelopeChartDto } from '../../shared/review';
import { gofStoreFor } from '../batches/gofStore';
import type { LoadedBatch } from '../batches/service';

export { columnSd } from '../batches/gofCompute';

export class GofCache {
  private readonly entries = new Map<number, EnvelopeChartDto[]>();
  constructor(private readonly limit = 16) {}

  /** Every card of a done batch (period by period, in the batch's statistic order). */
  all(dataSource: DataSource, batch: LoadedBatch): EnvelopeChartDto[] {
    const hit = this.entries.get(batch.row.id);
    if (hit) return hit;
    const store = gofStoreFor(dataSource);
    const out: EnvelopeChartDto[] = [];
    for (const period of batch.summary.periods) {
      // Stored when the batch finished (computed in the GOF worker); computed here only for a batch
      // whose GOF was never stored and whose reader did not call prepare() first.
      for (const { gof: g, sd } of store.storedOrComputeHere(batch, period)) {
        out.push({
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
        });
      }
    }
    if (this.entries.size >= this.limit) this.entries.delete(this.entries.keys().next().value!);
    this.entries.set(batch.row.id, out);
    return out;
  }

  /** Makes sure a done batch's GOF is stored, computing what is missing in the GOF worker thread. */
  async prepare(dataSource: DataSource, batch: LoadedBatch): Promise<void> {
    if (batch.summary.state === 'done' && !this.entries.has(batch.row.id)) await gofStoreFor(dataSource).ensure(batch);
  }

  one(dataSource: DataSource, batch: LoadedBatch, statistic: string, period: number): EnvelopeChartDto | undefined {
    return this.all(dataSource, batch).find((c) => c.statistic === statistic && c.period === period);
  }
}
