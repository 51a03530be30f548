/**
 * The actors file of an upload: the actor labels (their set and order) and the covariates, constant
 * (`name`) or changing (`name@1`, `name@2`, ...), numeric or categorical, and who is present at
 * which wave (`present@1` .. `present@M`, 1 or 0) (shared/data.ts).
 */
import type { CovariateKind } from '../../shared/data';
import { ProblemList } from './problems';
import { checkLabel, type SourceFile } from './files';
import type { CovariateValue, ParsedCovariate } from './parse';

export const NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

export const CHANGING = /^(.+)@(\d+)$/;

export interface ActorsFile {
  labels: string[];
  covariates: ParsedCovariate[];
  /** Per wave, per actor: 1 present, 0 absent (from present@1 .. present@M), or null without those columns. */
  presence: Uint8Array[] | null;
}

/** Columns present@1 .. present@M of the actors file say in which waves an actor belongs to the group. */
export const PRESENCE_COLUMN = 'present';

export function parseActors(file: SourceFile, waveCount: number, missingMarker: string, problems: ProblemList): ActorsFile | null {
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
      if (count < 2 && labels.length >= 2) {
        problems.add(file.name, `Only ${count} actor${count === 1 ? ' is' : 's are'} present at wave ${w + 1}; a wave needs at least 2.`, header.line, presenceColumns.get(w + 1)! + 1);
      }
    });
  }
  return { labels, covariates, presence };
}

// ---------- edge lists ----------
