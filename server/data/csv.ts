/**
 * A small CSV reader for upload files: one record a line (no line breaks inside fields), fields
 * separated by commas, or by semicolons or tabs when the first non-blank line has no comma;
 * "quoted" fields with "" for a quote; spaces around fields trimmed; blank lines skipped.
 * Follows RFC 4180 (Shafranovich 2005, Common Format and MIME Type for CSV Files) except that
 * quoted fields may not span lines, and that a field written by our downloads with a leading
 * apostrophe against formula injection (shared/csvSafe.ts) is read without it.
 */
import { restoreCell } from '../../shared/csvSafe';

export interface CsvRow {
  /** Line number in the file, from 1. */
  line: number;
  fields: string[];
}

export interface CsvProblem {
  line: number;
  column: number;
  message: string;
}

export interface CsvResult {
  rows: CsvRow[];
  delimiter: ',' | ';' | '\t';
  problems: CsvProblem[];
}

function detectDelimiter(firstLine: string): ',' | ';' | '\t' {
  if (firstLine.includes(',')) return ',';
  if (firstLine.includes('\t')) return '\t';
  if (firstLine.includes(';')) return ';';
  return ',';
}

/** Splits one line into fields; returns a problem message for an unterminated quote. */
export function splitCsvLine(line: string, delimiter: string): { fields: string[]; error?: { column: number; message: string } } {
  const fields: string[] = [];
  let i = 0;
  while (true) {
    // skip leading spaces (not the delimiter itself, which may be a tab)
    while (i < line.length && (line[i] === ' ' || (line[i] === '\t' && delimiter !== '\t'))) i++;
    if (line[i] === '"') {
      let value = '';
      i++;
      let closed = false;
      while (i < line.length) {
        if (line[i] === '"') {
          if (line[i + 1] === '"') {
            value += '"';
            i += 2;
            continue;
          }
          closed = true;
          i++;
          break;
        }
        value += line[i++];
      }
      if (!closed) {
        return { fields, error: { column: fields.length + 1, message: 'A quoted field is not closed with " on this line.' } };
      }
      while (i < line.length && line[i] !== delimiter) {
        if (line[i] !== ' ' && line[i] !== '\t') {
          return { fields, error: { column: fields.length + 1, message: 'Unexpected text after a closing quote.' } };
        }
        i++;
      }
      fields.push(value);
    } else {
      const end = line.indexOf(delimiter, i);
      const stop = end === -1 ? line.length : end;
      fields.push(line.slice(i, stop).trim());
      i = stop;
    }
    if (i >= line.length) break;
    i++; // past the delimiter
    if (i === line.length) {
      fields.push('');
      break;
    }
  }
  return { fields };
}

export function readCsv(content: string): CsvResult {
  const text = content.charCodeAt(0) === 0xfeff ? content.slice(1) : content;
  const lines = text.split(/\r\n|\n|\r/);
  const firstLine = lines.find((l) => l.trim() !== '') ?? '';
  const delimiter = detectDelimiter(firstLine);
  const rows: CsvRow[] = [];
  const problems: CsvProblem[] = [];
  lines.forEach((raw, k) => {
    if (raw.trim() === '') return;
    const { fields, error } = splitCsvLine(raw, delimiter);
    if (error) problems.push({ line: k + 1, ...error });
    else rows.push({ line: k + 1, fields: fields.map(restoreCell) });
  });
  return { rows, delimiter, problems };
}
