/**
 * Storing and loading a study's data (actors, waves, covariates).
 * - replaceStudyData: writes a parsed upload in one transaction, replacing what was there.
 * - loadStudyData: what the estimator and the batch engine read (see README.md).
 * - studyDataView / waveTies: the API responses.
 */
import type { DataSource, EntityManager } from 'typeorm';
import type { DataFormat, DataPreviewResponse, FixedPairInfo, StudyDataResponse, WaveTiesResponse } from '../../shared/data';
import { conflict } from '../errors';
import { StudyEntity } from '../studies/entities';
import { ActorEntity, CovariateEntity, WaveEntity, type Covariate, type Wave } from './entities';
import { TIE_MISSING, TIE_PRESENT, type ParsedCovariate, type ParsedStudyData } from './parse';
import { DATA_REPLACE_GUARDS, type DataReplaceGuard } from './replaceGuards';
import { compareWaves, summarizeCovariate, summarizeWave } from './summaries';

/** Writes the data in one transaction; returns whether older data was replaced. Throws 409 data_in_use if a guard refuses. */
export async function replaceStudyData(
  dataSource: DataSource,
  studyId: number,
  data: ParsedStudyData,
  guards: readonly DataReplaceGuard[] = DATA_REPLACE_GUARDS,
  options: { confirmReplace?: boolean } = {},
): Promise<{ replaced: boolean }> {
  return dataSource.transaction(async (manager: EntityManager) => {
    const waves = manager.getRepository(WaveEntity);
    const replaced = (await waves.countBy({ studyId })) > 0;
    if (replaced) {
      for (const guard of guards) {
        const refusal = await guard(manager, studyId, { confirmed: options.confirmReplace === true });
        if (refusal) throw conflict('data_in_use', refusal);
      }
    }
    await manager.getRepository(CovariateEntity).delete({ studyId });
    await waves.delete({ studyId });
    await manager.getRepository(ActorEntity).delete({ studyId });

    const n = data.actors.length;
    await manager.getRepository(ActorEntity).insert(data.actors.map((label, index) => ({ studyId, index, label })));
    for (const [k, wave] of data.waves.entries()) {
      await waves.insert({
        studyId,
        index: k + 1,
        label: wave.label,
        actorCount: n,
        adjacency: Buffer.from(wave.adjacency.buffer, wave.adjacency.byteOffset, wave.adjacency.byteLength),
        sourceFormat: data.format,
        fixed: wave.fixed && wave.fixed.some((v) => v !== 0) ? Buffer.from(wave.fixed) : null,
        present: wave.present && wave.present.some((v) => v === 0) ? Buffer.from(wave.present) : null,
      });
    }
    if (data.covariates.length) {
      await manager.getRepository(CovariateEntity).insert(
        data.covariates.map((c) => ({
          studyId,
          name: c.name,
          kind: c.kind,
          changing: c.changing,
          values: c.values,
          categories: c.categories,
        })),
      );
    }
    await manager.getRepository(StudyEntity).update({ id: studyId }, { updatedAt: new Date() });
    return { replaced };
  });
}

// ---------- loading for the engine ----------

export interface LoadedCovariate {
  kind: 'numeric' | 'categorical';
  changing: boolean;
  /** Sorted category labels (categorical); codes index into this list. */
  categories: string[];
  /**
   * One array of n values per column (one column if constant, one per wave if changing), actor order
   * as `actors`: numeric as Float64Array with NaN for missing; categorical as Int32Array of codes
   * into `categories` with -1 for missing. These are the shapes server/engine's buildEffects takes.
   */
  values: Float64Array[] | Int32Array[];
}

export interface LoadedStudyData {
  actors: string[];
  waveLabels: string[];
  /** One row-major n*n matrix per wave (sender row, receiver column): 0 no tie, 1 tie, 2 missing. */
  waves: Uint8Array[];
  /** Per wave: n*n, 1 where the pair's tie is fixed at that wave (its value in `waves`); null when no pair is. */
  fixed: Array<Uint8Array | null>;
  /** Per wave: n, 1 where the actor is present; null when every actor is. */
  present: Array<Uint8Array | null>;
  covariates: Record<string, LoadedCovariate>;
}

function toEngineValues(c: Covariate): Float64Array[] | Int32Array[] {
  if (c.kind === 'numeric') {
    return c.values.map((column) => Float64Array.from(column, (v) => (typeof v === 'number' ? v : NaN)));
  }
  const code = new Map(c.categories.map((label, k) => [label, k]));
  return c.values.map((column) => Int32Array.from(column, (v) => (v === null ? -1 : (code.get(String(v)) ?? -1))));
}

async function readRows(dataSource: DataSource, studyId: number) {
  const [actors, waves, covariates] = await Promise.all([
    dataSource.getRepository(ActorEntity).find({ where: { studyId }, order: { index: 'ASC' } }),
    dataSource.getRepository(WaveEntity).find({ where: { studyId }, order: { index: 'ASC' } }),
    dataSource.getRepository(CovariateEntity).find({ where: { studyId }, order: { name: 'ASC' } }),
  ]);
  return { actors, waves, covariates };
}

function adjacencyOf(wave: Wave): Uint8Array {
  return new Uint8Array(wave.adjacency);
}

/**
 * The study's data for computation. Throws when the study has no data (fewer than two waves).
 * Cost: O(M n^2) to copy the waves.
 */
export async function loadStudyData(dataSource: DataSource, studyId: number): Promise<LoadedStudyData> {
  const rows = await readRows(dataSource, studyId);
  if (rows.waves.length < 2) throw new Error(`study-data: study ${studyId} has no uploaded waves`);
  const n = rows.actors.length;
  for (const w of rows.waves) {
    if (w.adjacency.length !== n * n) throw new Error(`study-data: wave ${w.index} of study ${studyId} does not match its ${n} actors`);
  }
  const covariates: Record<string, LoadedCovariate> = {};
  for (const c of rows.covariates) {
    covariates[c.name] = { kind: c.kind, changing: Boolean(c.changing), categories: c.categories, values: toEngineValues(c) };
  }
  return {
    actors: rows.actors.map((a) => a.label),
    waveLabels: rows.waves.map((w) => w.label),
    waves: rows.waves.map(adjacencyOf),
    fixed: rows.waves.map((w) => (w.fixed ? new Uint8Array(w.fixed) : null)),
    present: rows.waves.map((w) => (w.present ? new Uint8Array(w.present) : null)),
    covariates,
  };
}

// ---------- API views ----------

/**
 * Pairs of an actor absent at a wave count as not observed in the summaries (density, reciprocity,
 * change): they are marked missing in a copy, and not counted among the missing pairs.
 */
function forSummary(n: number, adjacency: Uint8Array, present: Uint8Array | null | undefined): { cells: Uint8Array; absentPairs: number; absent: number } {
  if (!present) return { cells: adjacency, absentPairs: 0, absent: 0 };
  const cells = adjacency.slice();
  let absentPairs = 0;
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      if (i === j || (present[i] && present[j])) continue;
      if (cells[i * n + j] !== TIE_MISSING) absentPairs++;
      cells[i * n + j] = TIE_MISSING;
    }
  }
  return { cells, absentPairs, absent: present.reduce((s, v) => s + (v ? 0 : 1), 0) };
}

interface ViewInput {
  format: DataFormat;
  actors: string[];
  waves: Array<{ index: number; label: string; adjacency: Uint8Array; fixed: Uint8Array | null; present: Uint8Array | null }>;
  covariates: ParsedCovariate[];
}

/** Fixed pairs grouped by pair and value, with the waves they hold in. */
function fixedPairList(actors: string[], waves: ViewInput['waves']): FixedPairInfo[] {
  const n = actors.length;
  const groups = new Map<string, FixedPairInfo>();
  waves.forEach((w) => {
    if (!w.fixed) return;
    for (let k = 0; k < n * n; k++) {
      if (!w.fixed[k]) continue;
      const value = (w.adjacency[k] === TIE_PRESENT ? 1 : 0) as 0 | 1;
      const key = `${k}:${value}`;
      const g = groups.get(key) ?? { sender: actors[Math.floor(k / n)], receiver: actors[k % n], value, waves: [] };
      g.waves.push(w.index);
      groups.set(key, g);
    }
  });
  return [...groups.values()];
}

function viewOf(input: ViewInput): Omit<StudyDataResponse, 'hasData' | 'uploadedAt'> {
  const n = input.actors.length;
  const prepared = input.waves.map((w) => forSummary(n, w.adjacency, w.present));
  const fixed = fixedPairList(input.actors, input.waves);
  const anyPresence = input.waves.some((w) => w.present);
  return {
    format: input.format,
    actors: input.actors,
    // stored covariates are read back by name (readRows); list them so here too
    covariates: [...input.covariates].sort((a, b) => (a.name < b.name ? -1 : a.name > b.name ? 1 : 0)).map(summarizeCovariate),
    waves: input.waves.map((w, k) => {
      const summary = summarizeWave(w.index, w.label, n, prepared[k].cells);
      if (!w.present && !anyPresence) return summary;
      return { ...summary, missing: summary.missing - prepared[k].absentPairs, absent: prepared[k].absent };
    }),
    changes: input.waves.slice(1).map((w, k) => compareWaves(input.waves[k].index, w.index, n, prepared[k].cells, prepared[k + 1].cells)),
    ...(fixed.length ? { fixed, fixedPairs: new Set(fixed.map((f) => `${f.sender}\u0000${f.receiver}`)).size } : {}),
    ...(anyPresence ? { presence: input.actors.map((_, i) => input.waves.map((w) => !w.present || w.present[i] === 1)) } : {}),
  };
}

/** The summaries of a parsed (not stored) upload: what the preview shows, from the same code as the stored view. */
export function parsedDataView(data: ParsedStudyData): Extract<DataPreviewResponse, { ok: true }>['preview'] {
  return viewOf({
    format: data.format,
    actors: data.actors,
    covariates: data.covariates,
    waves: data.waves.map((w, k) => ({
      index: k + 1,
      label: w.label,
      adjacency: w.adjacency,
      fixed: w.fixed && w.fixed.some((v) => v !== 0) ? w.fixed : null,
      present: w.present && w.present.some((v) => v === 0) ? w.present : null,
    })),
  });
}

export async function studyDataView(dataSource: DataSource, studyId: number): Promise<StudyDataResponse> {
  const rows = await readRows(dataSource, studyId);
  if (rows.waves.length === 0) {
    return { hasData: false, format: null, uploadedAt: null, actors: [], covariates: [], waves: [], changes: [] };
  }
  return {
    hasData: true,
    uploadedAt: rows.waves[0].createdAt.toISOString(),
    ...viewOf({
      format: rows.waves[0].sourceFormat,
      actors: rows.actors.map((a) => a.label),
      covariates: rows.covariates.map((c) => ({ ...c, changing: Boolean(c.changing) })),
      waves: rows.waves.map((w) => ({
        index: w.index,
        label: w.label,
        adjacency: adjacencyOf(w),
        fixed: w.fixed ? new Uint8Array(w.fixed) : null,
        present: w.present ? new Uint8Array(w.present) : null,
      })),
    }),
  };
}

/** The ties and missing pairs of wave `index` (from 1); null if there is no such wave. */
export async function waveTies(dataSource: DataSource, studyId: number, index: number): Promise<WaveTiesResponse | null> {
  const wave = await dataSource.getRepository(WaveEntity).findOneBy({ studyId, index });
  if (!wave) return null;
  const actors = await dataSource.getRepository(ActorEntity).find({ where: { studyId }, order: { index: 'ASC' } });
  const n = actors.length;
  const ties: Array<[number, number]> = [];
  const missing: Array<[number, number]> = [];
  const adjacency = adjacencyOf(wave);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      if (i === j) continue;
      const v = adjacency[i * n + j];
      if (v === TIE_PRESENT) ties.push([i, j]);
      else if (v === TIE_MISSING) missing.push([i, j]);
    }
  }
  return { index: wave.index, label: wave.label, actors: actors.map((a) => a.label), ties, missing };
}
