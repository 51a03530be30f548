/** Number formats of the data screens (figures in tables). */
export const fmtDensity = (v: number) => v.toFixed(3);
export const fmtShare = (v: number) => `${(100 * v).toFixed(v > 0 && v < 0.01 ? 1 : 0)}%`;
export const fmtRatio = (v: number | null) => (v === null ? '—' : v.toFixed(2));
export const fmtMean = (v: number | null) => (v === null ? '—' : Number.isInteger(v) || Math.abs(v) >= 100 ? v.toFixed(0) : v.toFixed(2));
