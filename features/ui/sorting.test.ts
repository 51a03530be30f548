import { describe, expect, it } from 'vitest';
import { sortRows } from './sorting';

// Expected orders follow common practice for data tables: numbers compare as numbers, text
// compares in natural order ignoring case (the Unicode collation with numeric ordering that
// Intl.Collator implements), ties keep their input order (ECMAScript 2019 requires a stable
// Array.prototype.sort), and missing values go last whichever way the column is sorted.
describe('sortRows', () => {
  const rows = [
    { name: 'Wave 10', n: 3, d: '2025-03-01' },
    { name: 'wave 2', n: 12, d: '2024-11-20' },
    { name: 'Wave 1', n: 3, d: null as string | null },
    { name: 'Anchor', n: 100, d: '2025-01-05' },
  ];
  it('orders text naturally and without regard to case', () => {
    expect(sortRows(rows, (r) => r.name, 'ascending').map((r) => r.name)).toEqual(['Anchor', 'Wave 1', 'wave 2', 'Wave 10']);
    expect(sortRows(rows, (r) => r.name, 'descending').map((r) => r.name)).toEqual(['Wave 10', 'wave 2', 'Wave 1', 'Anchor']);
  });
  it('orders numbers numerically (100 after 12), keeping ties in input order', () => {
    expect(sortRows(rows, (r) => r.n, 'ascending').map((r) => r.name)).toEqual(['Wave 10', 'Wave 1', 'wave 2', 'Anchor']);
    expect(sortRows(rows, (r) => r.n, 'descending').map((r) => r.name)).toEqual(['Anchor', 'wave 2', 'Wave 10', 'Wave 1']);
  });
  it('puts missing values last in both directions', () => {
    expect(sortRows(rows, (r) => r.d, 'ascending').map((r) => r.name)).toEqual(['wave 2', 'Anchor', 'Wave 10', 'Wave 1']);
    expect(sortRows(rows, (r) => r.d, 'descending').map((r) => r.name)).toEqual(['Wave 10', 'Anchor', 'wave 2', 'Wave 1']);
  });
  it('does not change the input array', () => {
    const before = rows.map((r) => r.name);
    sortRows(rows, (r) => r.name, 'descending');
    expect(rows.map((r) => r.name)).toEqual(before);
  });
});
