/**
 * The consensus threshold's arithmetic, kept apart from the component so it can be tested without a
 * renderer: snapping to the step, the value at a pointer position on the track, and the keys.
 */
export const clampThreshold = (v: number, min: number, step: number) => Math.min(1, Math.max(min, Math.round(v / step) * step));

/** The threshold at a horizontal position on the track (left edge = min, right edge = 1), or null when the position is unknown. */
export function thresholdAt(x: number, trackLeft: number, trackWidth: number, min: number, step: number): number | null {
  if (![x, trackLeft, trackWidth].every(Number.isFinite) || trackWidth <= 0) return null;
  const share = Math.min(1, Math.max(0, (x - trackLeft) / trackWidth));
  return Number(clampThreshold(min + share * (1 - min), min, step).toFixed(2));
}

/** The new value for a key pressed on the focused track, or null for other keys. */
export function thresholdForKey(key: string, value: number, min: number, step: number): number | null {
  const moves: Record<string, number> = { ArrowRight: step, ArrowUp: step, ArrowLeft: -step, ArrowDown: -step, PageUp: 2 * step, PageDown: -2 * step };
  if (key === 'Home') return min;
  if (key === 'End') return 1;
  if (!(key in moves)) return null;
  return Number(clampThreshold(value + moves[key], min, step).toFixed(2));
}
