/**
 * The upload screen's pure logic: files and their roles, guessing a role and the wave format from a
 * file, building the upload body, and placing each server problem beside its file and line.
 */
import { actorsFileTitle, waveFileTitle, type DataFormat, type DataProblem, type DataUploadBody, MAX_FILE_BYTES } from '../../shared/data';

export type FileRole = 'wave' | 'actors' | 'fixed' | 'skip';

export interface UploadEntry {
  id: string;
  /** File name (a pasted text gets a made-up one). */
  name: string;
  content: string;
  bytes: number;
  tooLarge: boolean;
  pasted: boolean;
  role: FileRole;
  /** Wave number from 1 (role wave). */
  wave: number;
  /** Wave label (role wave). */
  label: string;
}

const baseName = (name: string) => name.replace(/\.[A-Za-z0-9]{1,4}$/, '');

export function lines(content: string): string[] {
  const text = content.charCodeAt(0) === 0xfeff ? content.slice(1) : content;
  return text.split(/\r\n|\n|\r/);
}

function firstLine(content: string): string {
  return lines(content).find((l) => l.trim() !== '') ?? '';
}

/** The server's rule (server/data/csv.ts): a comma in the first line, else a tab, else a semicolon. */
export function delimiterOf(content: string): ',' | ';' | '\t' {
  const first = firstLine(content);
  if (first.includes(',')) return ',';
  if (first.includes('\t')) return '\t';
  if (first.includes(';')) return ';';
  return ',';
}

/** Guess a new file's role from its name and first line; waves take the number in the name, else the next free one. */
export function guessRole(name: string, content: string, taken: number[]): { role: FileRole; wave: number } {
  const lower = name.toLowerCase();
  const head = firstLine(content).toLowerCase();
  if (/actor|crew|people|member|covariate/.test(lower) || /^"?label"?\s*[,;\t]/.test(head)) return { role: 'actors', wave: 0 };
  if (/fixed|zero|pairs/.test(lower)) return { role: 'fixed', wave: 0 };
  const digits = /(\d+)(?!.*\d)/.exec(baseName(name));
  const asked = digits ? Number(digits[1]) : NaN;
  if (Number.isInteger(asked) && asked >= 1 && asked <= 20 && !taken.includes(asked)) return { role: 'wave', wave: asked };
  let next = 1;
  while (taken.includes(next)) next++;
  return { role: 'wave', wave: next };
}

/** A 0/1 matrix starts with an empty corner cell or has more than three fields in its first line. */
export function guessFormat(content: string): DataFormat {
  const first = firstLine(content);
  const fields = first.split(delimiterOf(content));
  return fields.length > 3 || fields[0].trim() === '' || fields[0].trim() === '""' ? 'matrix' : 'edgelist';
}

export function newEntry(id: string, file: { name: string; content: string; bytes: number; tooLarge: boolean; pasted?: boolean }, existing: UploadEntry[]): UploadEntry {
  const taken = existing.filter((e) => e.role === 'wave').map((e) => e.wave);
  // a pasted text takes the next free wave (its made-up name carries no wave number)
  const { role, wave } = guessRole(file.pasted ? 'pasted.csv' : file.name, file.content, taken);
  return { id, name: file.name, content: file.content, bytes: file.bytes, tooLarge: file.tooLarge, pasted: Boolean(file.pasted), role, wave, label: baseName(file.name) };
}

/** Adds picked files; a file with the name of one already there replaces its content and keeps its role. */
export function addFiles(entries: UploadEntry[], files: Array<{ name: string; content: string; bytes: number; tooLarge: boolean }>, nextId: () => string): UploadEntry[] {
  let out = [...entries];
  for (const f of files) {
    const k = out.findIndex((e) => !e.pasted && e.name === f.name);
    if (k >= 0) out[k] = { ...out[k], content: f.content, bytes: f.bytes, tooLarge: f.tooLarge };
    else out = [...out, newEntry(nextId(), f, out)];
  }
  return out;
}

export const waveEntries = (entries: UploadEntry[]) => entries.filter((e) => e.role === 'wave').sort((a, b) => a.wave - b.wave);

/** Problems the screen finds before asking the server: roles that clash, files too large to read. */
export function localProblems(entries: UploadEntry[]): Array<{ entryId: string | null; message: string }> {
  const out: Array<{ entryId: string | null; message: string }> = [];
  const seen = new Map<number, string>();
  for (const e of waveEntries(entries)) {
    if (seen.has(e.wave)) out.push({ entryId: e.id, message: `Two files are wave ${e.wave} (${seen.get(e.wave)} and ${e.name}); give each wave its own number.` });
    else seen.set(e.wave, e.name);
  }
  const actors = entries.filter((e) => e.role === 'actors');
  if (actors.length > 1) out.push({ entryId: actors[1].id, message: `Only one actors file can be used; ${actors.map((a) => a.name).join(' and ')} are both marked as actors files.` });
  const fixed = entries.filter((e) => e.role === 'fixed');
  if (fixed.length > 1) out.push({ entryId: fixed[1].id, message: `Only one fixed-pairs file can be used; ${fixed.map((a) => a.name).join(' and ')} are both marked so.` });
  for (const e of entries) {
    if (e.tooLarge && e.role !== 'skip') {
      out.push({ entryId: e.id, message: `The file has ${(e.bytes / 1_048_576).toFixed(1)} MB; at most ${MAX_FILE_BYTES / 1_048_576} MB are allowed per file.` });
    }
  }
  return out;
}

export function uploadBody(entries: UploadEntry[], format: DataFormat, missingMarker: string, confirmReplace = false): DataUploadBody {
  const actors = entries.find((e) => e.role === 'actors');
  const fixed = entries.find((e) => e.role === 'fixed');
  return {
    format,
    waves: waveEntries(entries).map((e) => ({ label: e.label.trim(), content: e.content, fileName: e.name })),
    ...(actors ? { actors: { content: actors.content, fileName: actors.name } } : {}),
    ...(fixed ? { fixedPairs: { content: fixed.content, fileName: fixed.name } } : {}),
    missingMarker: missingMarker.trim() || 'NA',
    ...(confirmReplace ? { confirmReplace: true } : {}),
  };
}

/** The server names files as waveFileTitle / actorsFileTitle / fixedPairsFileTitle do; map each problem back to its entry. */
export function placeProblems(
  entries: UploadEntry[],
  problems: DataProblem[],
  fixedTitle: (fileName?: string) => string,
): { byEntry: Map<string, DataProblem[]>; general: DataProblem[] } {
  const titles = new Map<string, string>();
  waveEntries(entries).forEach((e, k) => titles.set(waveFileTitle(e.label.trim(), k, e.name), e.id));
  for (const e of entries) {
    if (e.role === 'actors') titles.set(actorsFileTitle(e.name), e.id);
    if (e.role === 'fixed') titles.set(fixedTitle(e.name), e.id);
  }
  const byEntry = new Map<string, DataProblem[]>();
  const general: DataProblem[] = [];
  for (const p of problems) {
    const id = titles.get(p.file);
    if (id) byEntry.set(id, [...(byEntry.get(id) ?? []), p]);
    else general.push(p);
  }
  return { byEntry, general };
}

/** The fields of one line, split as the server splits them (quotes honoured), for showing which column is meant. */
export function fieldsOf(line: string, delimiter: string): string[] {
  const out: string[] = [];
  let cur = '';
  let quoted = false;
  for (let i = 0; i < line.length; i++) {
    const c = line[i];
    if (c === '"') quoted = !quoted;
    if (c === delimiter && !quoted) {
      out.push(cur);
      cur = '';
    } else cur += c;
  }
  out.push(cur);
  return out;
}
