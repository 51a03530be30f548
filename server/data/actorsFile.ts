/**
 * The actors file of an upload: the actor labels (their set and order) and the covariates, constant
 * (`name`) or changing (`name@1`, `name@2`, ...), numeric or categorical (shared/data.ts).
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
}

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
    if (match) {
      const waves = changing.get(match[1]) ?? new Map<number, number>();
      waves.set(Number(match[2]), k + 1);
      changing.set(match[1], waves);
    } else {
      constant.set(raw, k + 1);
    }
  });
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
  for (const [name, position] of constant) build(name, [position], false);
  for (const [name, waves] of changing) {
    build(name, [...waves.keys()].sort((a, b) => a - b).map((w) => waves.get(w)!), true);
  }
  return { labels, covariates };
}

// ---------- edge lists ----------
