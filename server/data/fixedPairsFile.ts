/**
 * The fixed-pairs file of an upload (shared/data.ts): one pair a line, `sender,receiver,value[,waves]`,
 * value 0 (never a tie, a structural zero) or 1 (always a tie), waves as "2-3", "1 3" or "1;3", or
 * empty for every wave. `applyFixedPairs` checks them against the waves and writes the masks.
 */
import { ProblemList } from './problems';
import type { SourceFile } from './files';
import type { ParsedWave } from './parse';
import { TIE_MISSING } from './ties';
import { HEADER_PAIRS } from './waveFiles';

export interface FixedEntry {
  sender: number;
  receiver: number;
  value: number;
  /** Wave positions from 0. */
  waves: number[];
  line: number;
}

/** "2-3", "1 3", "1;3" or empty (every wave) -> wave positions from 0, or the message for bad text. */
export function parseWaveList(raw: string, waveCount: number): { waves: number[] } | { error: string } {
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

export function parseFixedPairs(file: SourceFile, index: Map<string, number>, waveCount: number, problems: ProblemList): FixedEntry[] {
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

/**
 * Checks each fixed pair against the observed waves (a missing observation takes the fixed value) and
 * gives every wave its mask (1 = fixed at that wave).
 */
export function applyFixedPairs(fixed: FixedEntry[], actors: string[], waves: ParsedWave[], fileName: string, problems: ProblemList): void {
  const n = actors.length;
  const masks = waves.map(() => new Uint8Array(n * n));
  for (const f of fixed) {
    const k = f.sender * n + f.receiver;
    for (const w of f.waves) {
      const observed = waves[w].adjacency[k];
      if (observed !== TIE_MISSING && observed !== f.value) {
        problems.add(
          fileName,
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
