/**
 * Parsing and validation of a study data upload (pure: no I/O, no Express).
 * The file conventions are documented in shared/data.ts. Everything is checked before anything is
 * stored; problems name the file, line and column (the field's position, from 1).
 */
import {
  MAX_ACTORS,
  MAX_FILE_BYTES,
  MAX_LABEL_LENGTH,
  type CovariateKind,
  type DataFormat,
  type DataProblemDetails,
  type ParsedDataUploadBody,
  actorsFileTitle,
  fixedPairsFileTitle,
  waveFileTitle,
} from '../../shared/data';
import { readCsv, type CsvRow } from './csv';
import { ProblemList } from './problems';

/** Cell codes of a stored adjacency matrix (row-major n*n, sender row, receiver column). */
export const TIE_ABSENT = 0;
export const TIE_PRESENT = 1;
export const TIE_MISSING = 2;

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

const HEADER_PAIRS = [
  ['sender', 'receiver'],
  ['from', 'to'],
  ['ego', 'alter'],
  ['source', 'target'],
];
const NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;
const CHANGING = /^(.+)@(\d+)$/;

interface SourceFile {
  name: string;
  rows: CsvRow[];
}

const waveFileName = waveFileTitle;

/** Size, emptiness and CSV syntax; returns the rows, or null when the file cannot be read further. */
function readFile(name: string, content: string, problems: ProblemList): SourceFile | null {
  const bytes = Buffer.byteLength(content, 'utf8');
  if (bytes > MAX_FILE_BYTES) {
    problems.add(name, `The file has ${(bytes / 1_048_576).toFixed(1)} MB; at most ${MAX_FILE_BYTES / 1_048_576} MB are allowed per file.`);
    return null;
  }
  const csv = readCsv(content);
  for (const p of csv.problems) problems.add(name, p.message, p.line, p.column);
  if (csv.rows.length === 0) {
    if (csv.problems.length === 0) problems.add(name, 'The file is empty.');
    return null;
  }
  return { name, rows: csv.rows };
}

function checkLabel(label: string, file: string, line: number, column: number, problems: ProblemList, what = 'actor label'): boolean {
  if (label === '') {
    problems.add(file, `The ${what} is empty.`, line, column);
    return false;
  }
  if (label.length > MAX_LABEL_LENGTH) {
    problems.add(file, `The ${what} "${label.slice(0, 20)}…" has ${label.length} characters; at most ${MAX_LABEL_LENGTH} are allowed.`, line, column);
    return false;
  }
  return true;
}

// ---------- actors file ----------

interface ActorsFile {
  labels: string[];
  covariates: ParsedCovariate[];
  /** Per wave, per actor: 1 present, 0 absent (from present@1 .. present@M), or null without those columns. */
  presence: Uint8Array[] | null;
}

/** Columns present@1 .. present@M of the actors file say in which waves an actor belongs to the group. */
export const PRESENCE_COLUMN = 'present';

function parseActors(file: SourceFile, waveCount: number, missingMarker: string, problems: ProblemList): ActorsFile | null {
  const [header, ...body] = file.rows;
  if (header.fields[0].toLowerCase() !== 'label') {
    problems.add(
      file.name,
      `The first line must be a header whose first column is "label" (found "${header.fields[0]}").`,
      header.line,
      1,
    );
    return null;
  }
  // Columns: constant "name" or changing "name@wave".
  const constant = new Map<string, number>(); // name -> field position
  const changing = new Map<string, Map<number, number>>(); // name -> wave -> field position
  const seen = new Map<string, number>();
  const presenceColumns = new Map<number, number>(); // wave -> field position
  let headerOk = true;
  header.fields.slice(1).forEach((raw, k) => {
    const column = k + 2;
    if (!checkLabel(raw, file.name, header.line, column, problems, 'covariate name')) {
      headerOk = false;
      return;
    }
    if (seen.has(raw)) {
      problems.add(file.name, `The column "${raw}" appears twice (first in column ${seen.get(raw)}).`, header.line, column);
      headerOk = false;
      return;
    }
    seen.set(raw, column);
    const match = CHANGING.exec(raw);
    if (match && match[1] === PRESENCE_COLUMN) {
      presenceColumns.set(Number(match[2]), k + 1);
    } else if (match) {
      const waves = changing.get(match[1]) ?? new Map<number, number>();
      waves.set(Number(match[2]), k + 1);
      changing.set(match[1], waves);
    } else {
      constant.set(raw, k + 1);
    }
  });
  if (constant.has(PRESENCE_COLUMN)) {
    problems.add(
      file.name,
      `"${PRESENCE_COLUMN}" is the name of the presence columns; give one per wave, "${PRESENCE_COLUMN}@1" to "${PRESENCE_COLUMN}@${waveCount}", with 1 (present) or 0 (absent).`,
      header.line,
      constant.get(PRESENCE_COLUMN)! + 1,
    );
    headerOk = false;
  }
  if (presenceColumns.size > 0) {
    const numbers = [...presenceColumns.keys()].sort((a, b) => a - b);
    if (numbers.length !== waveCount || !numbers.every((w, k) => w === k + 1)) {
      problems.add(
        file.name,
        `The presence columns must be "${PRESENCE_COLUMN}@1" to "${PRESENCE_COLUMN}@${waveCount}", one per wave; found @${numbers.join(', @')}.`,
        header.line,
        presenceColumns.get(numbers[0])! + 1,
      );
      headerOk = false;
    }
  }
  for (const [name, waves] of changing) {
    if (constant.has(name)) {
      problems.add(file.name, `"${name}" is both a constant column and a changing one ("${name}@…"); use one form.`, header.line, constant.get(name)! + 1);
      headerOk = false;
      continue;
    }
    const numbers = [...waves.keys()].sort((a, b) => a - b);
    const gapless = numbers.every((w, k) => w === k + 1);
    if (!gapless || numbers.length < waveCount - 1 || numbers.length > waveCount) {
      problems.add(
        file.name,
        `The changing covariate "${name}" needs one column per wave, "${name}@1" to "${name}@${waveCount - 1}" (or to @${waveCount}); found @${numbers.join(', @')}.`,
        header.line,
        waves.get(numbers[0])! + 1,
      );
      headerOk = false;
    }
  }

  const labels: string[] = [];
  const firstLine = new Map<string, number>();
  const cells: string[][] = [];
  for (const row of body) {
    if (row.fields.length !== header.fields.length) {
      problems.add(file.name, `This line has ${row.fields.length} fields; the header has ${header.fields.length}.`, row.line);
      continue;
    }
    const label = row.fields[0];
    if (!checkLabel(label, file.name, row.line, 1, problems)) continue;
    if (firstLine.has(label)) {
      problems.add(file.name, `Duplicate actor label "${label}" (first on line ${firstLine.get(label)}).`, row.line, 1);
      continue;
    }
    firstLine.set(label, row.line);
    labels.push(label);
    cells.push(row.fields);
  }
  if (labels.length === 0 && body.length === 0) {
    problems.add(file.name, 'The actors file has a header but no actors.', header.line);
    return null;
  }
  if (!headerOk) return null;

  const covariates: ParsedCovariate[] = [];
  const build = (name: string, positions: number[], isChanging: boolean) => {
    const raw = positions.map((p) => cells.map((r) => r[p]));
    const observed = raw.flat().filter((v) => v !== '' && v !== missingMarker);
    if (observed.length === 0) {
      problems.add(file.name, `The covariate "${name}" has no observed values.`, header.line, positions[0] + 1);
      return;
    }
    const kind: CovariateKind = observed.every((v) => NUMBER.test(v)) ? 'numeric' : 'categorical';
    const values = raw.map((column) =>
      column.map((v): CovariateValue => (v === '' || v === missingMarker ? null : kind === 'numeric' ? Number(v) : v)),
    );
    const categories = kind === 'categorical' ? [...new Set(observed)].sort((a, b) => a.localeCompare(b, 'en')) : [];
    covariates.push({ name, kind, changing: isChanging, categories, values });
  };
  for (const [name, position] of constant) if (name !== PRESENCE_COLUMN) build(name, [position], false);
  for (const [name, waves] of changing) {
    build(name, [...waves.keys()].sort((a, b) => a - b).map((w) => waves.get(w)!), true);
  }
  let presence: Uint8Array[] | null = null;
  if (presenceColumns.size > 0) {
    presence = Array.from({ length: waveCount }, () => new Uint8Array(labels.length));
    cells.forEach((row, i) => {
      for (let w = 1; w <= waveCount; w++) {
        const position = presenceColumns.get(w)!;
        const v = row[position];
        if (v === '1') presence![w - 1][i] = 1;
        else if (v !== '0') {
          problems.add(file.name, `"${PRESENCE_COLUMN}@${w}" of "${row[0]}" is "${v}"; write 1 (present at wave ${w}) or 0 (absent).`, firstLine.get(row[0])!, position + 1);
        }
      }
    });
    presence.forEach((p, w) => {
      const count = p.reduce((a, b) => a + b, 0);
      if (count < 2 && labels.length >= 2) problems.add(file.name, `Only ${count} actor${count === 1 ? ' is' : 's are'} present at wave ${w + 1}; a wave needs at least 2.`, header.line, presenceColumns.get(w + 1)! + 1);
    });
  }
  return { labels, covariates, presence };
}

// ---------- edge lists ----------

interface EdgeEntry {
  sender: string;
  receiver: string;
  value: number;
  line: number;
}

function parseEdgeList(file: SourceFile, missingMarker: string, problems: ProblemList): EdgeEntry[] {
  const entries: EdgeEntry[] = [];
  const firstSeen = new Map<string, number>();
  file.rows.forEach((row, k) => {
    const f = row.fields;
    if (k === 0 && f.length >= 2 && HEADER_PAIRS.some(([a, b]) => f[0].toLowerCase() === a && f[1].toLowerCase() === b)) return;
    if (f.length < 2 || f.length > 3) {
      problems.add(file.name, `Expected "sender,receiver" (and optionally a value); this line has ${f.length} field${f.length === 1 ? '' : 's'}.`, row.line);
      return;
    }
    const [sender, receiver] = f;
    if (!checkLabel(sender, file.name, row.line, 1, problems) || !checkLabel(receiver, file.name, row.line, 2, problems)) return;
    let value = TIE_PRESENT;
    if (f.length === 3) {
      if (f[2] === '1') value = TIE_PRESENT;
      else if (f[2] === '0') value = TIE_ABSENT;
      else if (f[2] === missingMarker) value = TIE_MISSING;
      else {
        problems.add(file.name, `The value "${f[2]}" is not 0, 1 or the missing marker "${missingMarker}".`, row.line, 3);
        return;
      }
    }
    if (sender === receiver) {
      problems.add(file.name, `Self-tie: "${sender}" names themself; ties to oneself are not allowed.`, row.line, 2);
      return;
    }
    const key = `${sender}\u0000${receiver}`;
    if (firstSeen.has(key)) {
      problems.add(file.name, `Duplicate tie "${sender}" → "${receiver}" (first on line ${firstSeen.get(key)}).`, row.line, 1);
      return;
    }
    firstSeen.set(key, row.line);
    entries.push({ sender, receiver, value, line: row.line });
  });
  return entries;
}

// ---------- matrices ----------

interface MatrixFile {
  labels: string[];
  /** Row-major codes in the file's own order. */
  cells: Uint8Array;
  headerLine: number;
  /** Line of each row, in the file's order. */
  rowLines: number[];
}

function parseMatrix(file: SourceFile, missingMarker: string, problems: ProblemList): MatrixFile | null {
  const [header, ...body] = file.rows;
  const labels = header.fields.slice(1);
  const start = problems.count;
  const seen = new Map<string, number>();
  labels.forEach((label, j) => {
    if (!checkLabel(label, file.name, header.line, j + 2, problems)) return;
    if (seen.has(label)) {
      problems.add(file.name, `Duplicate actor label "${label}" in the first row (first in column ${seen.get(label)}).`, header.line, j + 2);
    } else seen.set(label, j + 2);
  });
  const n = labels.length;
  if (n === 0) {
    problems.add(file.name, 'The first row must hold the actor labels, after one corner cell.', header.line);
    return null;
  }
  if (body.length !== n) {
    problems.add(
      file.name,
      `The matrix is not square: the first row names ${n} actor${n === 1 ? '' : 's'} but ${body.length} row${body.length === 1 ? '' : 's'} follow.`,
      body[n]?.line ?? header.line,
    );
  }
  const cells = new Uint8Array(n * n);
  body.slice(0, n).forEach((row, i) => {
    if (row.fields[0] !== labels[i]) {
      problems.add(
        file.name,
        `The row label "${row.fields[0]}" differs from the column label "${labels[i]}" in the same position; rows and columns must list the actors in the same order.`,
        row.line,
        1,
      );
    }
    if (row.fields.length !== n + 1) {
      problems.add(file.name, `The matrix is not square: this row has ${row.fields.length - 1} values for ${n} columns.`, row.line);
      return;
    }
    for (let j = 0; j < n; j++) {
      const raw = row.fields[j + 1];
      let code: number;
      if (raw === '0') code = TIE_ABSENT;
      else if (raw === '1') code = TIE_PRESENT;
      else if (raw === missingMarker) code = TIE_MISSING;
      else {
        problems.add(file.name, `The value "${raw}" is not 0, 1 or the missing marker "${missingMarker}".`, row.line, j + 2);
            continue;
      }
      if (i === j) {
        if (code === TIE_PRESENT) {
          problems.add(file.name, `Self-tie: the diagonal cell of "${labels[i]}" is 1; ties to oneself are not allowed.`, row.line, j + 2);
        }
        code = TIE_ABSENT;
      }
      cells[i * n + j] = code;
    }
  });
  return problems.count > start ? null : { labels, cells, headerLine: header.line, rowLines: body.slice(0, n).map((r) => r.line) };
}


// ---------- fixed pairs ----------

interface FixedEntry {
  sender: number;
  receiver: number;
  value: number;
  /** Wave positions from 0. */
  waves: number[];
  line: number;
}

/** "2-3", "1 3", "1;3" or empty (every wave) -> wave positions from 0; null with a problem on bad text. */
function parseWaveList(raw: string, waveCount: number): { waves: number[] } | { error: string } {
  if (raw.trim() === '') return { waves: Array.from({ length: waveCount }, (_, k) => k) };
  const out = new Set<number>();
  for (const token of raw.trim().split(/[\s;]+/)) {
    const m = /^(\d+)(?:-(\d+))?$/.exec(token);
    if (!m) return { error: `"${raw}" is not a list of waves; write e.g. "2-3" or "1 3", or leave it empty for every wave.` };
    const a = Number(m[1]);
    const b = m[2] === undefined ? a : Number(m[2]);
    if (a < 1 || b > waveCount || a > b) return { error: `Waves "${token}" do not exist: the upload has waves 1 to ${waveCount}.` };
    for (let w = a; w <= b; w++) out.add(w - 1);
  }
  return { waves: [...out].sort((x, y) => x - y) };
}

function parseFixedPairs(file: SourceFile, index: Map<string, number>, waveCount: number, problems: ProblemList): FixedEntry[] {
  const entries: FixedEntry[] = [];
  const firstSeen = new Map<string, number>();
  file.rows.forEach((row, k) => {
    const f = row.fields;
    if (k === 0 && f.length >= 2 && HEADER_PAIRS.some(([a, b]) => f[0].toLowerCase() === a && f[1].toLowerCase() === b)) return;
    if (f.length < 3 || f.length > 4) {
      problems.add(file.name, `Expected "sender,receiver,value" and optionally the waves; this line has ${f.length} field${f.length === 1 ? '' : 's'}.`, row.line);
      return;
    }
    const [sender, receiver, value] = f;
    const s = index.get(sender);
    const r = index.get(receiver);
    if (s === undefined || r === undefined) {
      const unknown = s === undefined ? sender : receiver;
      problems.add(file.name, `Unknown actor "${unknown}": not among the actors of the upload.`, row.line, s === undefined ? 1 : 2);
      return;
    }
    if (s === r) {
      problems.add(file.name, `"${sender}" is paired with themself; ties to oneself never exist, so they need no fixing.`, row.line, 2);
      return;
    }
    if (value !== '0' && value !== '1') {
      problems.add(file.name, `The fixed value "${value}" is not 0 (never a tie) or 1 (always a tie).`, row.line, 3);
      return;
    }
    const list = parseWaveList(f[3] ?? '', waveCount);
    if ('error' in list) {
      problems.add(file.name, list.error, row.line, 4);
      return;
    }
    for (const w of list.waves) {
      const key = `${s},${r},${w}`;
      if (firstSeen.has(key)) {
        problems.add(file.name, `The pair "${sender}" → "${receiver}" is fixed twice at wave ${w + 1} (first on line ${firstSeen.get(key)}).`, row.line, 1);
        return;
      }
    }
    for (const w of list.waves) firstSeen.set(`${s},${r},${w}`, row.line);
    entries.push({ sender: s, receiver: r, value: Number(value), waves: list.waves, line: row.line });
  });
  return entries;
}

// ---------- the whole upload ----------

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
    if (!actors && !body.actors) {
      const order = new Set<string>();
      for (const list of lists) for (const e of list ?? []) order.add(e.sender).add(e.receiver);
      actors = [...order];
    }
    if (actors) {
      const index = new Map(actors.map((a, i) => [a, i]));
      const n = actors.length;
      lists.forEach((list, k) => {
        if (!list) return;
        const adjacency = new Uint8Array(n * n);
        let ok = true;
        for (const e of list) {
          const s = index.get(e.sender);
          const r = index.get(e.receiver);
          if (s === undefined || r === undefined) {
            const label = s === undefined ? e.sender : e.receiver;
            problems.add(names[k], `Unknown actor "${label}": not in the actors file.`, e.line, s === undefined ? 1 : 2);
            ok = false;
            continue;
          }
          const present = actorsFile?.presence?.[k];
          if (present && e.value === TIE_PRESENT && (!present[s] || !present[r])) {
            const away = !present[s] ? e.sender : e.receiver;
            problems.add(names[k], `"${away}" is not present at wave ${k + 1} (${PRESENCE_COLUMN}@${k + 1} is 0 in the actors file), so this tie cannot be there.`, e.line, !present[s] ? 1 : 2);
            ok = false;
            continue;
          }
          adjacency[s * n + r] = e.value;
        }
        if (ok) waves.push({ label: body.waves[k].label, adjacency });
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
    const index = new Map(actors.map((a, i) => [a, i]));
    const n = actors.length;
    const fixed = parseFixedPairs(fixedSource, index, waveCount, problems);
    if (waves.length === waveCount) {
      const masks = waves.map(() => new Uint8Array(n * n));
      for (const f of fixed) {
        const k = f.sender * n + f.receiver;
        for (const w of f.waves) {
          const observed = waves[w].adjacency[k];
          if (observed !== TIE_MISSING && observed !== f.value) {
            problems.add(
              fixedName,
              `The pair "${actors[f.sender]}" → "${actors[f.receiver]}" is fixed at ${f.value} (${f.value ? 'always a tie' : 'never a tie'}), but wave ${w + 1} ${observed ? 'has this tie' : 'does not have it'}.`,
              f.line,
              3,
            );
            continue;
          }
          waves[w].adjacency[k] = f.value;
          masks[w][k] = 1;
        }
      }
      waves.forEach((w, k) => (w.fixed = masks[k]));
    }
  }

  if (actors && problems.count === 0) {
    if (actors.length < 2) problems.add('', `A network needs at least 2 actors; found ${actors.length}.`);
    if (actors.length > MAX_ACTORS) problems.add('', `At most ${MAX_ACTORS} actors are supported; found ${actors.length}.`);
  }
  if (problems.count > 0 || !actors || waves.length !== waveCount) {
    if (problems.count === 0) problems.add('', 'The upload could not be read.');
    return { ok: false, details: problems.details() };
  }
  return { ok: true, data: { format: body.format, actors, waves, covariates: actorsFile?.covariates ?? [] } };
}
