import { useWindowDimensions } from 'react-native';
import { breakpointOf, gutterOf, type Breakpoint } from './breakpoints';

/** The current breakpoint and page gutter; re-renders when the window is resized. */
export function useBreakpoint(): { breakpoint: Breakpoint; width: number; gutter: number; compact: boolean } {
  const { width } = useWindowDimensions();
  const w = Math.max(0, width || 0);
  const breakpoint = breakpointOf(w);
  return { breakpoint, width: w, gutter: gutterOf(w), compact: breakpoint === 'compact' };
}
