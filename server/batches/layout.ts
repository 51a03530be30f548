/**
 * The layout of a batch's stored statistic rows: which statistics, in which order, with how many
 * components each (fixed when the batch is made, so every chain's row has the same length).
 */
import { AUX_STATISTIC_CATALOGUE, type AuxStatisticId } from '../../shared/auxStatistics';
import type { StatisticLayout } from '../../shared/batches';
import { auxLabels, type AuxOptions } from '../engine/statistics';

export interface ResolvedMaxima {
  degree: number;
  distance: number;
}

/** Maxima with the defaults of the statistics module (min(n-1, 10) and min(n-1, 6)). */
export function resolveMaxima(n: number, given: { degree?: number; distance?: number } = {}): ResolvedMaxima {
  return {
    degree: given.degree ?? Math.max(0, Math.min(n - 1, 10)),
    distance: given.distance ?? Math.max(1, Math.min(n - 1, 6)),
  };
}

export function auxOptionsOf(maxima: ResolvedMaxima): Required<AuxOptions> {
  return { maxDegree: maxima.degree, maxDistance: maxima.distance };
}

export function buildLayout(statistics: ReadonlyArray<AuxStatisticId>, maxima: ResolvedMaxima): StatisticLayout[] {
  return statistics.map((statistic) => ({
    statistic,
    label: AUX_STATISTIC_CATALOGUE.find((s) => s.id === statistic)?.label ?? statistic,
    components: auxLabels(statistic, auxOptionsOf(maxima)),
  }));
}

/** Offset of each statistic in a stored row, and the row length. */
export function layoutOffsets(layout: ReadonlyArray<StatisticLayout>): { offsets: Map<AuxStatisticId, number>; width: number } {
  const offsets = new Map<AuxStatisticId, number>();
  let width = 0;
  for (const s of layout) {
    offsets.set(s.statistic, width);
    width += s.components.length;
  }
  return { offsets, width };
}
