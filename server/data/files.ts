/** What every upload file goes through first: size, emptiness and CSV syntax; label rules; actor count limits. */
import { MAX_ACTORS, MAX_FILE_BYTES, MAX_LABEL_LENGTH } from '../../shared/data';
import { readCsv, type CsvRow } from './csv';
import { ProblemList } from './problems';

export interface SourceFile {
  name: string;
  rows: CsvRow[];
}

/** Size, emptiness and CSV syntax; returns the rows, or null when the file cannot be read further. */
export function readFile(name: string, content: string, problems: ProblemList): SourceFile | null {
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

export function checkLabel(label: string, file: string, line: number, column: number, problems: ProblemList, what = 'actor label'): boolean {
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

/** The size limits of a whole network (at least 2 actors, at most MAX_ACTORS). */
export function checkActorCount(actors: string[], problems: ProblemList): void {
  if (actors.length < 2) problems.add('', `A network needs at least 2 actors; found ${actors.length}.`);
  if (actors.length > MAX_ACTORS) problems.add('', `At most ${MAX_ACTORS} actors are supported; found ${actors.length}.`);
}

// ---------- the whole upload ----------
