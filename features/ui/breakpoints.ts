/**
 * Breakpoints: a pure function of the window width (CSS px / density-independent points).
 *
 *   compact  0 <= width < 640     phones: tabs at the bottom, tables reflow to cards
 *   medium   640 <= width < 1080  tablets and narrow windows: side bar, tables
 *   wide     1080 <= width        desktops: side bar, content column capped at 1100 px
 *
 * A 390 px phone is compact; a 1440 px desktop window is wide.
 */
export const BREAKPOINTS = { medium: 640, wide: 1080 } as const;

export type Breakpoint = 'compact' | 'medium' | 'wide';

export function breakpointOf(width: number): Breakpoint {
  if (typeof width !== 'number' || !Number.isFinite(width) || width < 0) {
    throw new RangeError(`breakpoints: window width must be a finite number >= 0, got ${String(width)}`);
  }
  if (width < BREAKPOINTS.medium) return 'compact';
  if (width < BREAKPOINTS.wide) return 'medium';
  return 'wide';
}

/** Where the main navigation sits: tabs at the bottom on a phone, a side bar otherwise. */
export function navigationOf(width: number): 'tabs' | 'sidebar' {
  return breakpointOf(width) === 'compact' ? 'tabs' : 'sidebar';
}

/** Whether a data table shows as rows of a table or as a stack of cards. */
export function tableLayoutOf(width: number): 'table' | 'cards' {
  return breakpointOf(width) === 'compact' ? 'cards' : 'table';
}

/** Horizontal page padding for a breakpoint (8-point grid). */
export function gutterOf(width: number): number {
  const bp = breakpointOf(width);
  return bp === 'compact' ? 16 : bp === 'medium' ? 24 : 40;
}
