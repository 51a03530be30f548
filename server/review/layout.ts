/**
 * Node positions for the consensus network view: a force-directed layout (ForceAtlas2, from
 * graphology-layout-forceatlas2) of the observed end wave of a period, started from a seeded random
 * layout (server/engine/prng.ts, derived from the batch seed), so the same batch and period always
 * give the same picture. Computed once per batch and period and kept: positions never move when the
 * frequency threshold changes, so ties appearing and vanishing are easy to follow.
 *
 * References: Jacomy, Venturini, Heymann & Bastian (2014) ForceAtlas2, a continuous graph layout
 * algorithm for handy network visualization, PLoS ONE 9(6): e98853.
 */
import type { DataSource } from 'typeorm';
import type { ConsensusLayoutDto } from '../../shared/review';
import { periodNetworks } from '../data/periods';
import type { LoadedBatch } from '../batches/service';
import { seededLayout } from '../data/layout';
import { loadStudyData } from '../data/store';
import { deriveSeed } from '../engine/prng';
import { ApiError } from '../errors';

export class LayoutCache {
  private readonly entries = new Map<string, ConsensusLayoutDto>();
  constructor(private readonly limit = 16) {}

  async get(dataSource: DataSource, batch: LoadedBatch, period: number): Promise<ConsensusLayoutDto> {
    if (!batch.summary.periods.includes(period)) {
      throw new ApiError(404, 'not_found', `This batch simulated period${batch.summary.periods.length > 1 ? 's' : ''} ${batch.summary.periods.join(', ')}; there is no period ${period} in it.`);
    }
    const key = `${batch.row.id}:${period}`;
    const hit = this.entries.get(key);
    if (hit) return hit;
    const data = await loadStudyData(dataSource, batch.row.studyId);
    const n = data.actors.length;
    if (n !== batch.row.actorCount) throw new ApiError(409, 'data_in_use', 'The study data changed after this batch was run.');
    const net = periodNetworks(data)[period - 1];
    const observed: Array<[number, number]> = [];
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) if (i !== j && net.compareMask[i * n + j] && net.end[i * n + j]) observed.push([i, j]);
    const covariates: ConsensusLayoutDto['covariates'] = Object.entries(data.covariates).map(([name, c]) => {
      // The value at the start of the period (a changing covariate's column for that wave).
      const column = c.values[Math.min(period - 1, c.values.length - 1)];
      const values = Array.from(column as ArrayLike<number>, (v) => (c.kind === 'numeric' ? (Number.isNaN(v) ? null : v) : v < 0 ? null : c.categories[v] ?? null));
      return { name, kind: c.kind, categories: c.categories, values };
    });
    const dto: ConsensusLayoutDto = {
      batchId: batch.row.id,
      period,
      actors: data.actors,
      positions: seededLayout(n, observed, deriveSeed(batch.summary.seed, 0x1a, period)),
      observedTies: observed,
      covariates,
    };
    if (this.entries.size >= this.limit) this.entries.delete(this.entries.keys().next().value!);
    this.entries.set(key, dto);
    return dto;
  }
}
