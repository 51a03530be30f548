/**
 * Read-only views of the stored data beyond the summaries: the CSV downloads (server/data/download.ts
 * writes them) and the one seeded layout shared by every wave's drawing, so a reader can follow an
 * actor from wave to wave.
 */
import type { DataSource } from 'typeorm';
import type { DataLayoutResponse } from '../../shared/data';
import { ActorEntity, CovariateEntity, WaveEntity } from './entities';
import { deriveSeed } from '../engine/prng';
import { seededLayout } from './layout';
import { formatActorsCsv, formatEdgeListCsv, formatFixedPairsCsv, formatMatrixCsv } from './download';
import { PRESENCE_COLUMN } from './actorsFile';
import { TIE_PRESENT } from './parse';
import { studyDataView } from './store';

async function actorLabels(dataSource: DataSource, studyId: number): Promise<string[]> {
  const actors = await dataSource.getRepository(ActorEntity).find({ where: { studyId }, order: { index: 'ASC' } });
  return actors.map((a) => a.label);
}

export async function downloadWave(dataSource: DataSource, studyId: number, index: number): Promise<string | null> {
  const wave = await dataSource.getRepository(WaveEntity).findOneBy({ studyId, index });
  if (!wave) return null;
  const actors = await actorLabels(dataSource, studyId);
  const adjacency = new Uint8Array(wave.adjacency);
  return wave.sourceFormat === 'matrix' ? formatMatrixCsv(actors, adjacency) : formatEdgeListCsv(actors, adjacency);
}

export async function downloadActors(dataSource: DataSource, studyId: number): Promise<string | null> {
  const actors = await actorLabels(dataSource, studyId);
  if (actors.length === 0) return null;
  const covariates = await dataSource.getRepository(CovariateEntity).find({ where: { studyId }, order: { name: 'ASC' } });
  const waves = await dataSource.getRepository(WaveEntity).find({ where: { studyId }, order: { index: 'ASC' } });
  const presence = waves.some((w) => w.present)
    ? waves.map((w) => ({ name: `${PRESENCE_COLUMN}@${w.index}`, values: actors.map((_, i) => (w.present && w.present[i] === 0 ? '0' : '1')) }))
    : [];
  return formatActorsCsv(actors, covariates.map((c) => ({ ...c, changing: Boolean(c.changing) })), 'NA', presence);
}

/** The fixed pairs as `sender,receiver,value,waves` (waves as a space-separated list), or null when there are none. */
export async function downloadFixedPairs(dataSource: DataSource, studyId: number): Promise<string | null> {
  const view = await studyDataView(dataSource, studyId);
  if (!view.fixed?.length) return null;
  return formatFixedPairsCsv(view.fixed);
}

/** A ForceAtlas2 layout of the union of every wave's ties, from a seed fixed per study. */
export async function dataLayout(dataSource: DataSource, studyId: number): Promise<DataLayoutResponse | null> {
  const waves = await dataSource.getRepository(WaveEntity).find({ where: { studyId }, order: { index: 'ASC' } });
  if (waves.length === 0) return null;
  const actors = await actorLabels(dataSource, studyId);
  const n = actors.length;
  const union = new Set<number>();
  for (const w of waves) {
    const a = new Uint8Array(w.adjacency);
    for (let k = 0; k < n * n; k++) if (a[k] === TIE_PRESENT) union.add(k);
  }
  const ties = [...union].map((k) => [Math.floor(k / n), k % n] as [number, number]);
  return { actors, positions: seededLayout(n, ties, deriveSeed(0x5eed, studyId)) };
}
