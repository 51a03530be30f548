/**
 * CSV cells that a spreadsheet cannot run: every CSV the product writes goes through csvCell.
 *
 * A spreadsheet treats a cell that starts with =, +, -, @, a tab or a carriage return as a formula
 * (OWASP, "CSV Injection"), so a note such as =HYPERLINK(...) written raw would run on the lead's
 * machine. Text cells starting with one of these characters get a leading apostrophe, which the
 * spreadsheet shows as text; then RFC 4180 quoting applies (Shafranovich 2005, Common Format and
 * MIME Type for CSV Files): fields with a comma, quote or line break are quoted, quotes doubled.
 *
 * Numbers stay numbers: a finite JavaScript number is written as it is, and so is a text cell that is
 * exactly one plain number ("-3.5", "+7", "1e-7"), which a spreadsheet reads as that number and never
 * as a formula. A text cell that merely starts like one is neutralised: "-1+1" would be a formula.
 * The upload reader (server/data/csv.ts) drops the apostrophe again with restoreCell, so a
 * downloaded data file uploads to the same rows.
 */

export type CsvValue = string | number | boolean | null | undefined;

/** Characters that make a spreadsheet read a cell as a formula (OWASP CSV Injection). */
export const FORMULA_START = /^[=+\-@\t\r]/;

/** A text cell holding exactly one plain decimal number. */
const PLAIN_NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

/** Neutralises a text cell that would start a formula; other text is returned unchanged. */
export function neutraliseFormula(text: string): string {
  return FORMULA_START.test(text) && !PLAIN_NUMBER.test(text) ? `'${text}` : text;
}

/** Undoes neutraliseFormula when reading a file back: an apostrophe before = + - @, tab or CR is dropped. */
export function restoreCell(value: string): string {
  return value.length > 1 && value[0] === "'" && FORMULA_START.test(value.slice(1)) ? value.slice(1) : value;
}

/** One CSV field: numbers as written, text neutralised and quoted when needed. */
export function csvCell(value: CsvValue): string {
  if (value === null || value === undefined) return '';
  if (typeof value === 'number') return Number.isFinite(value) ? String(value) : '';
  if (typeof value === 'boolean') return value ? 'true' : 'false';
  const text = neutraliseFormula(value);
  return /[",\r\n]|^\s|\s$/.test(text) ? `"${text.replace(/"/g, '""')}"` : text;
}

/** One CSV record (no line end). */
export function csvLine(values: readonly CsvValue[]): string {
  return values.map(csvCell).join(',');
}

/** A whole CSV document: records joined and ended by `eol` (CRLF by default, as RFC 4180 says). */
export function csvDocument(rows: readonly (readonly CsvValue[])[], eol: '\r\n' | '\n' = '\r\n'): string {
  return rows.map(csvLine).join(eol) + eol;
}
