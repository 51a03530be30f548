/**
 * One CSV cell for a file a person may open in a spreadsheet: quoted when it holds a delimiter, a
 * quote or outer spaces (RFC 4180), and neutralised against formula injection: a text cell that
 * starts with = + - @, a tab or a carriage return gets a leading apostrophe, so a spreadsheet shows
 * it as text instead of running it (OWASP, CSV Injection). Plain numbers ("-1.5") are left alone.
 * The upload reader (server/data/csv.ts) drops that apostrophe again, so a downloaded file
 * uploads to the same rows.
 */
const NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;
const RISKY = /^[=+\-@\t\r]/;

export function neutraliseCell(value: string): string {
  return RISKY.test(value) && !NUMBER.test(value) ? `'${value}` : value;
}

/** Undoes neutraliseCell: an apostrophe followed by = + - @, tab or CR is dropped. */
export function restoreCell(value: string): string {
  return value.length > 1 && value[0] === "'" && RISKY.test(value.slice(1)) ? value.slice(1) : value;
}

export function csvCell(value: string): string {
  const safe = neutraliseCell(value);
  return /[",;\t\r\n]|^\s|\s$/.test(safe) ? `"${safe.replace(/"/g, '""')}"` : safe;
}
