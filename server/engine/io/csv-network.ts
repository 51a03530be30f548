/**
 * Network CSV parser: reads a directed network from CSV text, as an edge list or a square 0/1 matrix.
 *
 * Purpose: a small pure parser (text in, actors and adjacency out, no I/O) shared by the command line and
 * available to the upload code. Formats:
 * - edge list: two columns `sender,receiver` of actor labels, one tie per row; an optional header row
 *   (sender,receiver / from,to / source,target / ego,alter, any case);
 * - matrix: a first row of actor labels after an empty (or any) corner cell, then one row per actor:
 *   its label and n values 0 or 1; row labels must match the column labels (same set; rows are matched
 *   by label). The diagonal must be 0 or empty.
 * Cells may be quoted ("..." with "" for a quote); the delimiter is a comma, or a tab or semicolon when
 * the first line has no comma. A byte-order mark and Windows line ends are accepted.
 *
 * References:
 * - Shafranovich, Y. (2005). RFC 4180: Common format and MIME type for comma-separated values (CSV) files.
 */

export interface ParsedNetwork {
  format: 'edge-list' | 'matrix';
  /** Actor labels in index order. */
  actors: string[];
  n: number;
  /** Row-major 0/1 adjacency, n*n. */
  adj: Uint8Array;
  /** Non-fatal remarks (e.g. a duplicated tie in an edge list). */
  warnings: string[];
}

export interface ParseNetworkOptions {
  /**
   * The actor set, in order. For an edge list it fixes the order and admits isolates; a label not in it is
   * an error. For a matrix the labels must be exactly these (in any order); rows and columns are reordered.
   */
  actors?: string[];
}

const HEADER_PAIRS = new Set(['sender,receiver', 'from,to', 'source,target', 'ego,alter']);

function fail(message: string, line?: number): never {
  throw new Error(`csv-network: ${line !== undefined ? `line ${line}: ` : ''}${message}`);
}

/** Split CSV text into rows of cells (RFC 4180 quoting). Returns each row with its 1-based line number. */
export function parseCsvRows(text: string): { line: number; cells: string[] }[] {
  if (text.charCodeAt(0) === 0xfeff) text = text.slice(1);
  const firstLine = text.split(/\r?\n/, 1)[0] ?? '';
  let delim = ',';
  if (!firstLine.includes(',')) {
    if (firstLine.includes('\t')) delim = '\t';
    else if (firstLine.includes(';')) delim = ';';
  }
  const rows: { line: number; cells: string[] }[] = [];
  let cells: string[] = [];
  let cell = '';
  let inQuotes = false;
  let line = 1;
  let rowLine = 1;
  let quotedCell = false;
  const endRow = () => {
    cells.push(quotedCell ? cell : cell.trim());
    if (!(cells.length === 1 && cells[0] === '' && !quotedCell)) rows.push({ line: rowLine, cells });
    cells = [];
    cell = '';
    quotedCell = false;
  };
  for (let k = 0; k < text.length; k++) {
    const ch = text[k];
    if (inQuotes) {
      if (ch === '"') {
        if (text[k + 1] === '"') {
          cell += '"';
          k++;
        } else inQuotes = false;
      } else {
        if (ch === '\n') line++;
        cell += ch;
      }
      continue;
    }
    if (ch === '"' && cell.trim() === '') {
      inQuotes = true;
      quotedCell = true;
      cell = '';
    } else if (ch === delim) {
      cells.push(quotedCell ? cell : cell.trim());
      cell = '';
      quotedCell = false;
    } else if (ch === '\n' || ch === '\r') {
      if (ch === '\r' && text[k + 1] === '\n') k++;
      endRow();
      line++;
      rowLine = line;
    } else {
      cell += ch;
    }
  }
  if (inQuotes) fail('a quoted cell is not closed', rowLine);
  if (cell !== '' || cells.length > 0) endRow();
  return rows;
}

function dropTrailingEmpty(cells: string[]): string[] {
  let end = cells.length;
  while (end > 0 && cells[end - 1] === '') end--;
  return cells.slice(0, end);
}

function parseEdgeList(rows: { line: number; cells: string[] }[], options: ParseNetworkOptions): ParsedNetwork {
  const warnings: string[] = [];
  let start = 0;
  const first = rows[0].cells.map((c) => c.toLowerCase()).join(',');
  if (HEADER_PAIRS.has(first)) start = 1;
  const fixed = options.actors !== undefined;
  const actors: string[] = fixed ? [...options.actors!] : [];
  const index = new Map<string, number>();
  actors.forEach((a, k) => {
    if (index.has(a)) fail(`actor "${a}" is listed twice`);
    index.set(a, k);
  });
  const ties: [number, number][] = [];
  const indexOf = (label: string, line: number): number => {
    if (label === '') fail('an actor label is empty', line);
    let k = index.get(label);
    if (k === undefined) {
      if (fixed) fail(`actor "${label}" is not one of the study's actors`, line);
      k = actors.length;
      actors.push(label);
      index.set(label, k);
    }
    return k;
  };
  for (let r = start; r < rows.length; r++) {
    const { line, cells } = rows[r];
    const c = dropTrailingEmpty(cells);
    if (c.length !== 2) {
      fail(`an edge list row has two cells (sender, receiver); this one has ${c.length}`, line);
    }
    if (c[0] === c[1]) fail(`self-tie "${c[0]}" -> "${c[1]}" (an actor cannot name itself)`, line);
    ties.push([indexOf(c[0], line), indexOf(c[1], line)]);
  }
  const n = actors.length;
  const adj = new Uint8Array(n * n);
  for (const [i, j] of ties) {
    if (adj[i * n + j]) warnings.push(`tie "${actors[i]}" -> "${actors[j]}" appears more than once; counted once`);
    adj[i * n + j] = 1;
  }
  return { format: 'edge-list', actors, n, adj, warnings };
}

function parseMatrix(rows: { line: number; cells: string[] }[], options: ParseNetworkOptions): ParsedNetwork {
  const header = dropTrailingEmpty(rows[0].cells);
  const labels = header.slice(1);
  const n = labels.length;
  if (n === 0) fail('the matrix header names no actors', rows[0].line);
  const column = new Map<string, number>();
  labels.forEach((a, k) => {
    if (a === '') fail(`column ${k + 2} of the header has no actor label`, rows[0].line);
    if (column.has(a)) fail(`actor "${a}" appears twice in the header`, rows[0].line);
    column.set(a, k);
  });
  const dataRows = rows.slice(1);
  if (dataRows.length !== n) {
    fail(`the matrix is not square: ${n} actor columns but ${dataRows.length} actor rows`);
  }
  // Final order: the given actor list, else the header order.
  let actors = labels;
  if (options.actors !== undefined) {
    const want = options.actors;
    if (want.length !== n || want.some((a) => !column.has(a))) {
      fail(`the matrix labels do not match the study's ${want.length} actors`);
    }
    actors = [...want];
  }
  const pos = new Map<string, number>(actors.map((a, k) => [a, k]));
  const adj = new Uint8Array(n * n);
  const seenRow = new Set<string>();
  for (const { line, cells } of dataRows) {
    const label = cells[0];
    if (!column.has(label)) fail(`row label "${label}" is not among the column labels`, line);
    if (seenRow.has(label)) fail(`actor "${label}" has two rows`, line);
    seenRow.add(label);
    const values = cells.slice(1);
    while (values.length > n && values[values.length - 1] === '') values.pop();
    if (values.length !== n) {
      fail(`the matrix is not square: row "${label}" has ${values.length} values for ${n} actors`, line);
    }
    const i = pos.get(label)!;
    for (let c = 0; c < n; c++) {
      const v = values[c];
      const j = pos.get(labels[c])!;
      if (labels[c] === label) {
        if (v === '1') fail(`self-tie on the diagonal for actor "${label}" (the diagonal must be 0)`, line);
        if (v !== '0' && v !== '') fail(`diagonal value for actor "${label}" must be 0 or empty, got "${v}"`, line);
        continue;
      }
      if (v === '1') adj[i * n + j] = 1;
      else if (v !== '0') {
        fail(`value "${v}" in row "${label}", column "${labels[c]}" is not 0 or 1`, line);
      }
    }
  }
  return { format: 'matrix', actors, n, adj, warnings: [] };
}

/**
 * Parse a network from CSV text. Throws Error("csv-network: line L: ...") for empty input, an edge-list row
 * without exactly two cells, a self-tie, a value other than 0/1, a non-square matrix, mismatched or
 * duplicated labels, or labels outside `options.actors`.
 */
export function parseNetworkCsv(text: string, options: ParseNetworkOptions = {}): ParsedNetwork {
  if (typeof text !== 'string') fail('expected CSV text');
  const rows = parseCsvRows(text);
  if (rows.length === 0) fail('the file is empty');
  const first = dropTrailingEmpty(rows[0].cells);
  const isMatrix = rows[0].cells[0] === '' || first.length >= 3;
  return isMatrix ? parseMatrix(rows, options) : parseEdgeList(rows, options);
}
