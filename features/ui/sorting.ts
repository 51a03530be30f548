/** Sorting of table rows: stable, numbers numerically, text in natural order ("Wave 2" before "Wave 10"). */
export type SortDirection = 'ascending' | 'descending';
export type SortValue = string | number | null | undefined;

const collator = new Intl.Collator('en', { numeric: true, sensitivity: 'base' });

export function compareValues(a: SortValue, b: SortValue): number {
  const aMissing = a === null || a === undefined || (typeof a === 'number' && Number.isNaN(a));
  const bMissing = b === null || b === undefined || (typeof b === 'number' && Number.isNaN(b));
  if (aMissing || bMissing) return aMissing === bMissing ? 0 : aMissing ? 1 : -1;
  if (typeof a === 'number' && typeof b === 'number') return a - b;
  return collator.compare(String(a), String(b));
}

/**
 * A sorted copy of rows. Missing values go last in either direction; equal values keep
 * their original order (Array.prototype.sort is stable since ES2019).
 */
export function sortRows<R>(rows: readonly R[], value: (row: R) => SortValue, direction: SortDirection): R[] {
  const sign = direction === 'ascending' ? 1 : -1;
  return rows
    .map((row) => ({ row, v: value(row) }))
    .sort((x, y) => {
      const xMissing = x.v === null || x.v === undefined;
      const yMissing = y.v === null || y.v === undefined;
      if (xMissing || yMissing) return xMissing === yMissing ? 0 : xMissing ? 1 : -1;
      return sign * compareValues(x.v, y.v);
    })
    .map((e) => e.row);
}
