/**
 * The consensus threshold's arithmetic: a position on the track maps linearly from `min` (left edge)
 * to 1 (right edge) and snaps to the step; a position that is not a number (a click event without
 * coordinates, the cause of "Threshold NaN") gives no value at all; keys follow the WAI-ARIA slider
 * pattern (W3C, ARIA Authoring Practices Guide, "Slider": arrows one step, Page Up/Down a larger
 * step, Home/End the ends).
 */
import { describe, expect, it } from 'vitest';
import { clampThreshold, thresholdAt, thresholdForKey } from './threshold';

describe('threshold track', () => {
  it('maps a pointer position to a snapped value between min and 1', () => {
    // Track from x = 100 to x = 300 (width 200); min 0.05, step 0.05.
    expect(thresholdAt(100, 100, 200, 0.05, 0.05)).toBe(0.05);
    expect(thresholdAt(300, 100, 200, 0.05, 0.05)).toBe(1);
    // 80% along: 0.05 + 0.8 * 0.95 = 0.81, snapped to 0.8.
    expect(thresholdAt(260, 100, 200, 0.05, 0.05)).toBe(0.8);
    // Beyond the ends clamps.
    expect(thresholdAt(0, 100, 200, 0.05, 0.05)).toBe(0.05);
    expect(thresholdAt(900, 100, 200, 0.05, 0.05)).toBe(1);
  });

  it('gives no value for a position or a track it cannot read (never NaN)', () => {
    expect(thresholdAt(NaN, 100, 200, 0.05, 0.05)).toBeNull();
    expect(thresholdAt(undefined as unknown as number, 100, 200, 0.05, 0.05)).toBeNull();
    expect(thresholdAt(150, 100, 0, 0.05, 0.05)).toBeNull();
    expect(thresholdAt(150, NaN, 200, 0.05, 0.05)).toBeNull();
  });

  it('moves by the keys of a slider and stays within its range', () => {
    expect(thresholdForKey('ArrowRight', 0.5, 0.05, 0.05)).toBe(0.55);
    expect(thresholdForKey('ArrowUp', 0.5, 0.05, 0.05)).toBe(0.55);
    expect(thresholdForKey('ArrowLeft', 0.5, 0.05, 0.05)).toBe(0.45);
    expect(thresholdForKey('PageUp', 0.5, 0.05, 0.05)).toBe(0.6);
    expect(thresholdForKey('PageDown', 0.1, 0.05, 0.05)).toBe(0.05);
    expect(thresholdForKey('Home', 0.5, 0.05, 0.05)).toBe(0.05);
    expect(thresholdForKey('End', 0.5, 0.05, 0.05)).toBe(1);
    expect(thresholdForKey('ArrowRight', 1, 0.05, 0.05)).toBe(1);
    expect(thresholdForKey('a', 0.5, 0.05, 0.05)).toBeNull();
    expect(clampThreshold(0.333, 0.05, 0.05)).toBeCloseTo(0.35, 12);
  });
});
