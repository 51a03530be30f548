import { useMemo, useState } from 'react';

/**
 * Hover and keyboard-focus state as plain values, for pressables whose style must be a static
 * object (a Link with asChild merges styles and cannot take a style function).
 */
export function useInteraction() {
  const [hovered, setHovered] = useState(false);
  const [focused, setFocused] = useState(false);
  const handlers = useMemo(
    () => ({
      onHoverIn: () => setHovered(true),
      onHoverOut: () => setHovered(false),
      onFocus: () => setFocused(true),
      onBlur: () => setFocused(false),
    }),
    [],
  );
  return { hovered, focused, handlers };
}
