/**
 * The stored data written back as CSV in the formats the upload reads (shared/data.ts), so that
 * upload -> download -> upload stores identical rows:
 * - a wave as an edge list `sender,receiver,value` (1 a tie, the missing marker for a pair not
 *   observed; absent pairs are not listed) or as a 0/1 matrix, whichever the study was uploaded as;
 * - the actors file: `label`, then each constant covariate, then each changing covariate as
 *   `name@1`, `name@2`, ... (the missing marker for a missing value), then `present@1` ... when the
 *   study has changing composition;
 * - the fixed pairs as `sender,receiver,value,waves`.
 * Cells are neutralised against spreadsheet formula injection (shared/csvSafe.ts, as every CSV the product writes).
 */
import { csvLine } from '../../shared/csvSafe';
import type { Covariate } from './entities';
import { TIE_MISSING, TIE_PRESENT } from './parse';

const line = (cells: string[]) => csvLine(cells);

export function formatEdgeListCsv(actors: readonly string[], adjacency: Uint8Array, missingMarker = 'NA'): string {
  const n = actors.length;
  const lines = [line(['sender', 'receiver', 'value'])];
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      if (i === j) continue;
      const v = adjacency[i * n + j];
      if (v === TIE_PRESENT) lines.push(line([actors[i], actors[j], '1']));
      else if (v === TIE_MISSING) lines.push(line([actors[i], actors[j], missingMarker]));
    }
  }
  return lines.join('\n') + '\n';
}

export function formatMatrixCsv(actors: readonly string[], adjacency: Uint8Array, missingMarker = 'NA'): string {
  const n = actors.length;
  const lines = [line(['', ...actors])];
  for (let i = 0; i < n; i++) {
    const cells = [actors[i]];
    for (let j = 0; j < n; j++) {
      const v = adjacency[i * n + j];
      cells.push(v === TIE_MISSING ? missingMarker : String(v === TIE_PRESENT ? 1 : 0));
    }
    lines.push(line(cells));
  }
  return lines.join('\n') + '\n';
}

/** Extra columns of the actors file (presence per wave, step 3 of the upload) come from `extra`. */
export function formatActorsCsv(
  actors: readonly string[],
  covariates: ReadonlyArray<Pick<Covariate, 'name' | 'kind' | 'changing' | 'values'>>,
  missingMarker = 'NA',
  extra: Array<{ name: string; values: string[] }> = [],
): string {
  const constant = covariates.filter((c) => !c.changing);
  const changing = covariates.filter((c) => c.changing);
  const header = ['label', ...constant.map((c) => c.name)];
  for (const c of changing) c.values.forEach((_, k) => header.push(`${c.name}@${k + 1}`));
  for (const e of extra) header.push(e.name);
  const cell = (v: number | string | null | undefined) => (v === null || v === undefined ? missingMarker : String(v));
  const lines = [line(header)];
  actors.forEach((label, i) => {
    const cells = [label, ...constant.map((c) => cell(c.values[0][i]))];
    for (const c of changing) for (const column of c.values) cells.push(cell(column[i]));
    for (const e of extra) cells.push(e.values[i]);
    lines.push(line(cells));
  });
  return lines.join('\n') + '\n';
}

/** Fixed pairs in the upload's fixed-pairs format: one line per pair and value, the waves as "1 2 3". */
export function formatFixedPairsCsv(pairs: ReadonlyArray<{ sender: string; receiver: string; value: 0 | 1; waves: number[] }>): string {
  const lines = [line(['sender', 'receiver', 'value', 'waves'])];
  for (const p of pairs) lines.push(line([p.sender, p.receiver, String(p.value), p.waves.join(' ')]));
  return lines.join('\n') + '\n';
}
