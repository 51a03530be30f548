/**
 * The wave files of an upload (and the command line's network file): edge lists with an optional
 * value column, and square matrices; the codes they give each pair (TIE_ABSENT, TIE_PRESENT,
 * TIE_MISSING of ./ties.ts).
 */
import { ProblemList } from './problems';
import { checkLabel, type SourceFile } from './files';
import { PRESENCE_COLUMN } from './actorsFile';
import { TIE_ABSENT, TIE_MISSING, TIE_PRESENT } from './ties';

export const HEADER_PAIRS = [
  ['sender', 'receiver'],
  ['from', 'to'],
  ['ego', 'alter'],
  ['source', 'target'],
];

export interface EdgeEntry {
  sender: string;
  receiver: string;
  value: number;
  line: number;
}

export function parseEdgeList(file: SourceFile, missingMarker: string, problems: ProblemList): EdgeEntry[] {
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

export interface MatrixFile {
  labels: string[];
  /** Row-major codes in the file's own order. */
  cells: Uint8Array;
  headerLine: number;
  /** Line of each row, in the file's order. */
  rowLines: number[];
}

export function parseMatrix(file: SourceFile, missingMarker: string, problems: ProblemList): MatrixFile | null {
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

/** Without an actors file: the labels met in the edge lists, in order of first appearance. */
export function actorsInOrderOfAppearance(lists: Array<EdgeEntry[] | null>): string[] {
  const order = new Set<string>();
  for (const list of lists) for (const e of list ?? []) order.add(e.sender).add(e.receiver);
  return [...order];
}

/**
 * One wave's adjacency from its edge list over the actor index; null (with problems) for unknown
 * actors, or for ties of an actor not present at this wave (`present`, 1 = present, with its wave number).
 */
export function edgeListAdjacency(
  list: EdgeEntry[],
  index: Map<string, number>,
  name: string,
  problems: ProblemList,
  presence?: { present: Uint8Array; wave: number },
): Uint8Array | null {
  const n = index.size;
  const adjacency = new Uint8Array(n * n);
  let ok = true;
  for (const e of list) {
    const s = index.get(e.sender);
    const r = index.get(e.receiver);
    if (s === undefined || r === undefined) {
      const label = s === undefined ? e.sender : e.receiver;
      problems.add(name, `Unknown actor "${label}": not in the actors file.`, e.line, s === undefined ? 1 : 2);
      ok = false;
      continue;
    }
    const present = presence?.present;
    if (present && e.value === TIE_PRESENT && (!present[s] || !present[r])) {
      const away = !present[s] ? e.sender : e.receiver;
      problems.add(name, `"${away}" is not present at wave ${presence.wave} (${PRESENCE_COLUMN}@${presence.wave} is 0 in the actors file), so this tie cannot be there.`, e.line, !present[s] ? 1 : 2);
      ok = false;
      continue;
    }
    adjacency[s * n + r] = e.value;
  }
  return ok ? adjacency : null;
}
