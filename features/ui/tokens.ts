/**
 * Raw design scales. Components never use bare numbers for spacing, type or radii: they read
 * these scales (and the role-named colours in theme.ts).
 */
import { Platform } from 'react-native';

/** Spacing on an 8-point grid; `half` (4) is the only step off the grid, for hairline gaps. */
export const space = {
  none: 0,
  half: 4,
  s1: 8,
  s2: 16,
  s3: 24,
  s4: 32,
  s5: 40,
  s6: 48,
  s8: 64,
} as const;
export type SpaceToken = keyof typeof space;

/** Font sizes in px with their line heights (about 1.4 for text, tighter for titles). */
export const fontSize = {
  caption: 13,
  small: 14,
  body: 16,
  lead: 18,
  heading: 20,
  title: 26,
  display: 32,
} as const;
export const lineHeight = {
  caption: 18,
  small: 20,
  body: 24,
  lead: 26,
  heading: 28,
  title: 32,
  display: 40,
} as const;

export const radius = {
  none: 0,
  sm: 4,
  md: 8,
  pill: 999,
} as const;

/** Hairline rule width for cards, tables and inputs. */
export const rule = 1;

/** The smallest touch target on a phone. */
export const touchTarget = 44;

/** Widest content column on a wide screen, and the side bar width. */
export const layout = {
  maxContentWidth: 1100,
  sideBarWidth: 232,
  tabBarHeight: 60,
} as const;

/**
 * Font families: only the weights actually shipped in fonts/ and loaded by the root layout.
 * Each weight is its own family name, so no platform ever synthesises a faux bold.
 */
export const fontFiles = {
  'Atkinson-Regular': 'AtkinsonHyperlegible_400Regular.ttf',
  'Atkinson-Bold': 'AtkinsonHyperlegible_700Bold.ttf',
  'PlexMono-Regular': 'IBMPlexMono_400Regular.ttf',
  'PlexMono-Medium': 'IBMPlexMono_500Medium.ttf',
} as const;
export type FontName = keyof typeof fontFiles;

/** On the web a fallback stack keeps text readable for the moment before the files arrive. */
function family(name: FontName, fallback: string): string {
  return Platform.OS === 'web' ? `${name}, ${fallback}` : name;
}
const sans = 'system-ui, -apple-system, "Segoe UI", sans-serif';
const mono = 'ui-monospace, "DejaVu Sans Mono", monospace';

export const fonts = {
  text: family('Atkinson-Regular', sans),
  textBold: family('Atkinson-Bold', sans),
  mono: family('PlexMono-Regular', mono),
  monoMedium: family('PlexMono-Medium', mono),
} as const;
