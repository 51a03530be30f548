import { describe, expect, it } from 'vitest';
import { BREAKPOINTS, breakpointOf, gutterOf, navigationOf, tableLayoutOf } from './breakpoints';

// The thresholds are our own design decision (features/ui/breakpoints.ts); the device widths
// used below are common practice for testing layouts: 390 px (a current phone in portrait),
// 768 px (a tablet in portrait), 1440 px (a desktop window). Each check sits exactly on, or one
// pixel / a fraction of a pixel either side of, a threshold so an off-by-one comparison fails.
describe('breakpointOf', () => {
  it('is compact from 0 up to, not including, the medium threshold', () => {
    expect(breakpointOf(0)).toBe('compact');
    expect(breakpointOf(390)).toBe('compact');
    expect(breakpointOf(639)).toBe('compact');
    expect(breakpointOf(639.5)).toBe('compact');
  });
  it('is medium exactly at 640 and up to, not including, 1080', () => {
    expect(BREAKPOINTS.medium).toBe(640);
    expect(breakpointOf(640)).toBe('medium');
    expect(breakpointOf(768)).toBe('medium');
    expect(breakpointOf(1079)).toBe('medium');
    expect(breakpointOf(1079.9)).toBe('medium');
  });
  it('is wide exactly at 1080 and above', () => {
    expect(BREAKPOINTS.wide).toBe(1080);
    expect(breakpointOf(1080)).toBe('wide');
    expect(breakpointOf(1440)).toBe('wide');
    expect(breakpointOf(5000)).toBe('wide');
  });
  it('rejects widths that are not finite, non-negative numbers with a clear error', () => {
    expect(() => breakpointOf(-1)).toThrow(/breakpoints: window width must be a finite number >= 0/);
    expect(() => breakpointOf(Number.NaN)).toThrow(/got NaN/);
    expect(() => breakpointOf(Number.POSITIVE_INFINITY)).toThrow(/breakpoints:/);
    expect(() => breakpointOf('390' as unknown as number)).toThrow(/breakpoints:/);
  });
});

describe('layout decisions follow the breakpoint', () => {
  it('uses tabs below 640 px and a side bar from 640 px', () => {
    expect(navigationOf(639)).toBe('tabs');
    expect(navigationOf(640)).toBe('sidebar');
    expect(navigationOf(1440)).toBe('sidebar');
  });
  it('reflows tables to cards below 640 px only', () => {
    expect(tableLayoutOf(390)).toBe('cards');
    expect(tableLayoutOf(639)).toBe('cards');
    expect(tableLayoutOf(640)).toBe('table');
  });
  it('widens the page gutter at each threshold, on the 8-point grid', () => {
    expect([gutterOf(639), gutterOf(640), gutterOf(1079), gutterOf(1080)]).toEqual([16, 24, 24, 40]);
    for (const w of [0, 640, 1080]) expect(gutterOf(w) % 8).toBe(0);
  });
});
