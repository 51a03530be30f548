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
import Graph from 'graphology';
import forceAtlas2 from 'graphology-layout-forceatlas2';
import type { DataSource } from 'typeorm';
import type { ConsensusLayoutDto } from '../../shared/review';
import { periodNetworks } from '../data/periods';
import type { LoadedBatch } from '../batches/service';
import { loadStudyData } from '../data/store';
import { deriveSeed, streamFor } from '../engine/prng';
import { ApiError } from '../errors';

/** Positions in [0, 1] x [0, 1] for n nodes and directed ties (treated as undirected springs). */
export function seededLayout(n: number, ties: Array<[number, number]>, seed: number, iterations = 300): Array<[number, number]> {
  if (n === 0) return [];
  if (n === 1) return [[0.5, 0.5]];
  const rng = streamFor(seed, 0x1a);
  const graph = new Graph({ type: 'undirected', multi: false });
  for (let i = 0; i < n; i++) graph.addNode(String(i), { x: rng.nextDouble() * 100, y: rng.nextDouble() * 100 });
  for (const [a, b] of ties) {
    if (a !== b && !graph.hasEdge(String(a), String(b))) graph.addEdge(String(a), String(b));
  }
  const settings = forceAtlas2.inferSettings(graph);
  const positions = forceAtlas2(graph, { iterations, settings: { ...settings, gravity: 1, scalingRatio: 4, strongGravityMode: true } });
  const xs = Array.from({ length: n }, (_, i) => positions[String(i)].x);
  const ys = Array.from({ length: n }, (_, i) => positions[String(i)].y);
  const [x0, x1, y0, y1] = [Math.min(...xs), Math.max(...xs), Math.min(...ys), Math.max(...ys)];
  const span = Math.max(x1 - x0, y1 - y0) || 1;
  // Keep the aspect ratio; centre the shorter side.
  const dx = (span - (x1 - x0)) / 2;
  const dy = (span - (y1 - y0)) / 2;
  return xs.map((x, i) => [(x - x0 + dx) / span, (ys[i] - y0 + dy) / span]);
}

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
