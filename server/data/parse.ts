/**
 * Parsing and validation of a study data upload (pure: no I/O, no Express).
 * The file conventions are documented in shared/data.ts. Everything is checked before anything is
 * stored; problems name the file, line and column (the field's position, from 1).
 * This file puts an upload together (parseUpload) and reads one network file on its own
 * (parseNetworkFile); the files themselves are read by ./files.ts, ./actorsFile.ts, ./waveFiles.ts
 * and ./fixedPairsFile.ts.
 */
import { actorsFileTitle, fixedPairsFileTitle, waveFileTitle } from '../../shared/data';
import type { CovariateKind, DataFormat, DataProblemDetails, ParsedDataUploadBody } from '../../shared/data';
import { PRESENCE_COLUMN, parseActors } from './actorsFile';
import { checkActorCount, readFile } from './files';
import { applyFixedPairs, parseFixedPairs } from './fixedPairsFile';
import { ProblemList } from './problems';
import { TIE_PRESENT } from './ties';
import { actorsInOrderOfAppearance, edgeListAdjacency, parseEdgeList, parseMatrix } from './waveFiles';

/** Cell codes of a stored adjacency matrix (./ties.ts); imported from here by the rest of the server. */
export { TIE_ABSENT, TIE_MISSING, TIE_PRESENT } from './ties';

export type CovariateValue = number | string | null;

export interface ParsedCovariate {
  name: string;
  kind: CovariateKind;
  changing: boolean;
  /** Sorted category labels (categorical only). */
  categories: string[];
  /** One array of n values per column: one column for a constant covariate, one per wave for a changing one. */
  values: CovariateValue[][];
}

export interface ParsedWave {
  label: string;
  adjacency: Uint8Array;
  /** n*n, 1 where the pair's tie is fixed at this wave (its value is in `adjacency`); absent without a fixed-pairs file. */
  fixed?: Uint8Array;
  /** n, 1 where the actor is present at this wave; absent without present@ columns. */
  present?: Uint8Array;
}

export interface ParsedStudyData {
  format: DataFormat;
  actors: string[];
  waves: ParsedWave[];
  covariates: ParsedCovariate[];
}

export type ParseResult = { ok: true; data: ParsedStudyData } | { ok: false; details: DataProblemDetails };

const waveFileName = waveFileTitle;

export function parseUpload(body: ParsedDataUploadBody): ParseResult {
  const problems = new ProblemList();
  const marker = body.missingMarker;
  const waveCount = body.waves.length;
  if (waveCount < 2) {
    problems.add('', `Upload at least two waves; ${waveCount === 0 ? 'none was' : 'one was'} given.`);
  }
  const names = body.waves.map((w, k) => waveFileName(w.label, k, w.fileName));
  const labelSeen = new Map<string, number>();
  body.waves.forEach((w, k) => {
    if (!w.label) problems.add(names[k], `Wave ${k + 1} needs a label.`);
    else if (labelSeen.has(w.label)) problems.add(names[k], `Two waves are labelled "${w.label}" (waves ${labelSeen.get(w.label)! + 1} and ${k + 1}).`);
    else labelSeen.set(w.label, k);
  });

  const actorsName = actorsFileTitle(body.actors?.fileName);
  const actorsSource = body.actors ? readFile(actorsName, body.actors.content, problems) : null;
  const waveSources = body.waves.map((w, k) => readFile(names[k], w.content, problems));
  const fixedName = fixedPairsFileTitle(body.fixedPairs?.fileName);
  const fixedSource = body.fixedPairs ? readFile(fixedName, body.fixedPairs.content, problems) : null;
  const actorsFile = actorsSource ? parseActors(actorsSource, Math.max(waveCount, 2), marker, problems) : null;

  let actors: string[] | null = actorsFile?.labels ?? null;
  const waves: ParsedWave[] = [];

  if (body.format === 'edgelist') {
    const lists = waveSources.map((src) => (src ? parseEdgeList(src, marker, problems) : null));
    if (!actors && !body.actors) actors = actorsInOrderOfAppearance(lists);
    if (actors) {
      const index = new Map(actors.map((a, i) => [a, i]));
      lists.forEach((list, k) => {
        if (!list) return;
        const present = actorsFile?.presence?.[k];
        const adjacency = edgeListAdjacency(list, index, names[k], problems, present ? { present, wave: k + 1 } : undefined);
        if (adjacency) waves.push({ label: body.waves[k].label, adjacency });
      });
    }
  } else {
    const matrices = waveSources.map((src) => (src ? parseMatrix(src, marker, problems) : null));
    let reference = actorsFile ? 'the actors file' : 'wave 1';
    if (!actors && !body.actors) {
      const first = matrices.findIndex((m) => m !== null);
      if (first >= 0) {
        actors = matrices[first]!.labels;
        reference = names[first];
      }
    }
    if (actors) {
      const index = new Map(actors.map((a, i) => [a, i]));
      const n = actors.length;
      matrices.forEach((m, k) => {
        if (!m) return;
        if (m.labels.length !== n) {
          problems.add(
            names[k],
            `The wave has ${m.labels.length} actors but ${reference} has ${n}; every wave must cover the same actors.`,
            m.headerLine,
          );
          return;
        }
        const unknown = m.labels.map((l, j) => [l, j] as const).filter(([l]) => !index.has(l));
        for (const [label, j] of unknown) {
          problems.add(names[k], `Unknown actor "${label}": not in ${reference}.`, m.headerLine, j + 2);
        }
        if (unknown.length) return;
        const position = m.labels.map((l) => index.get(l)!);
        const adjacency = new Uint8Array(n * n);
        for (let i = 0; i < n; i++) {
          for (let j = 0; j < n; j++) adjacency[position[i] * n + position[j]] = m.cells[i * m.labels.length + j];
        }
        const present = actorsFile?.presence?.[k];
        let ok = true;
        if (present) {
          for (let i = 0; i < n; i++) {
            for (let j = 0; j < n; j++) {
              const [a, b] = [position[i], position[j]];
              if (m.cells[i * n + j] === TIE_PRESENT && (!present[a] || !present[b])) {
                const away = !present[a] ? m.labels[i] : m.labels[j];
                problems.add(names[k], `"${away}" is not present at wave ${k + 1} (${PRESENCE_COLUMN}@${k + 1} is 0 in the actors file), so the tie "${m.labels[i]}" → "${m.labels[j]}" cannot be there.`, m.rowLines[i], j + 2);
                ok = false;
              }
            }
          }
        }
        if (ok) waves.push({ label: body.waves[k].label, adjacency });
      });
    }
  }

  if (actors && actorsFile?.presence && waves.length === waveCount) {
    waves.forEach((w, k) => (w.present = actorsFile.presence![k]));
  }
  if (fixedSource && actors) {
    const fixed = parseFixedPairs(fixedSource, new Map(actors.map((a, i) => [a, i])), waveCount, problems);
    if (waves.length === waveCount) applyFixedPairs(fixed, actors, waves, fixedName, problems);
  }

  if (actors && problems.count === 0) checkActorCount(actors, problems);
  if (problems.count > 0 || !actors || waves.length !== waveCount) {
    if (problems.count === 0) problems.add('', 'The upload could not be read.');
    return { ok: false, details: problems.details() };
  }
  return { ok: true, data: { format: body.format, actors, waves, covariates: actorsFile?.covariates ?? [] } };
}

// ---------- one network file ----------

export interface ParsedNetworkFile {
  actors: string[];
  /** Row-major n*n codes: TIE_ABSENT, TIE_PRESENT, TIE_MISSING. */
  adjacency: Uint8Array;
}

export type NetworkFileResult = { ok: true; network: ParsedNetworkFile } | { ok: false; details: DataProblemDetails };

/**
 * One network file on its own (the command line's `stats FILE`), read by exactly the rules of a wave
 * of an upload (shared/data.ts): the same CSV reader, the same edge-list and matrix checks, the same
 * messages. Without an actors file the actors are the labels of the file (edge list: in order of
 * first appearance; matrix: the first row).
 */
export function parseNetworkFile(name: string, content: string, format: DataFormat, missingMarker = 'NA'): NetworkFileResult {
  const problems = new ProblemList();
  const source = readFile(name, content, problems);
  let network: ParsedNetworkFile | null = null;
  if (source && format === 'edgelist') {
    const list = parseEdgeList(source, missingMarker, problems);
    const actors = actorsInOrderOfAppearance([list]);
    const adjacency = edgeListAdjacency(list, new Map(actors.map((a, i) => [a, i])), name, problems);
    if (adjacency) network = { actors, adjacency };
  } else if (source) {
    const matrix = parseMatrix(source, missingMarker, problems);
    if (matrix) network = { actors: matrix.labels, adjacency: matrix.cells };
  }
  if (network && problems.count === 0) checkActorCount(network.actors, problems);
  if (problems.count > 0 || !network) {
    if (problems.count === 0) problems.add(name, 'The file could not be read.');
    return { ok: false, details: problems.details() };
  }
  return { ok: true, network };
}
