/**
 * Colours named by their role, and the text styles. The palette follows DESIGN.md "Look":
 * a calm paper background, ink text, one deep teal accent, slate-blue envelope bands, and
 * verdict colours that always travel with a word and an icon.
 */
import type { TextStyle } from 'react-native';
import { palette } from '../../shared/palette';
import { fontSize, fonts, lineHeight } from './tokens';

/** The role-named colours: the shared palette (shared/palette.ts), also used by the PDF report. */
export const colors = palette;
export type ColorRole = keyof typeof colors;

/** Text styles. Numbers in tables and figures use `figure` (mono, tabular). */
export const text = {
  display: { fontFamily: fonts.textBold, fontSize: fontSize.display, lineHeight: lineHeight.display, color: colors.ink },
  title: { fontFamily: fonts.textBold, fontSize: fontSize.title, lineHeight: lineHeight.title, color: colors.ink },
  heading: { fontFamily: fonts.textBold, fontSize: fontSize.heading, lineHeight: lineHeight.heading, color: colors.ink },
  lead: { fontFamily: fonts.text, fontSize: fontSize.lead, lineHeight: lineHeight.lead, color: colors.ink },
  body: { fontFamily: fonts.text, fontSize: fontSize.body, lineHeight: lineHeight.body, color: colors.ink },
  bodyStrong: { fontFamily: fonts.textBold, fontSize: fontSize.body, lineHeight: lineHeight.body, color: colors.ink },
  muted: { fontFamily: fonts.text, fontSize: fontSize.body, lineHeight: lineHeight.body, color: colors.muted },
  small: { fontFamily: fonts.text, fontSize: fontSize.small, lineHeight: lineHeight.small, color: colors.ink },
  label: { fontFamily: fonts.textBold, fontSize: fontSize.small, lineHeight: lineHeight.small, color: colors.ink },
  caption: { fontFamily: fonts.text, fontSize: fontSize.caption, lineHeight: lineHeight.caption, color: colors.muted },
  /** Small capitals-like overline for section names ("Data", "Models"). */
  overline: {
    fontFamily: fonts.textBold,
    fontSize: fontSize.caption,
    lineHeight: lineHeight.caption,
    color: colors.muted,
    letterSpacing: 1,
    textTransform: 'uppercase',
  },
  figure: {
    fontFamily: fonts.mono,
    fontSize: fontSize.small,
    lineHeight: lineHeight.small,
    color: colors.ink,
    fontVariant: ['tabular-nums'],
  },
  figureLarge: {
    fontFamily: fonts.monoMedium,
    fontSize: fontSize.title,
    lineHeight: lineHeight.title,
    color: colors.ink,
    fontVariant: ['tabular-nums'],
  },
  link: { fontFamily: fonts.textBold, fontSize: fontSize.body, lineHeight: lineHeight.body, color: colors.accent },
} as const satisfies Record<string, TextStyle>;
export type TextVariant = keyof typeof text;
