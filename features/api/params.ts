/** Route and query parameters of the screens: ids in the URL. */

/** Parses a positive whole-number route parameter (studyId, batchId, ...); null otherwise. */
export function parseId(raw: string | string[] | undefined): number | null {
  const v = Array.isArray(raw) ? raw[0] : raw;
  if (!v || !/^[1-9][0-9]{0,15}$/.test(v)) return null;
  const n = Number(v);
  return Number.isSafeInteger(n) ? n : null;
}

/** Parses "1,2,3" from a query parameter into ids (invalid parts dropped, duplicates once). */
export function parseIds(raw: string | string[] | undefined): number[] {
  const v = Array.isArray(raw) ? raw.join(',') : raw ?? '';
  return [...new Set(v.split(',').map((p) => p.trim()).filter((p) => /^[1-9][0-9]{0,15}$/.test(p)).map(Number))];
}
