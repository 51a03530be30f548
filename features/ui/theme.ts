/**
 * Colours named by their role, and the text styles. The palette follows DESIGN.md "Look":
 * a calm paper background, ink text, one deep teal accent, slate-blue envelope bands, and
 * verdict colours that always travel with a word and an icon.
 */
import type { TextStyle } from 'react-native';
import { fontSize, fonts, lineHeight } from './tokens';

export const colors = {
  /** Page background. */
  paper: '#F6F4EF',
  /** Cards, inputs and table bodies sit one step lighter than the page. */
  surface: '#FCFBF8',
  /** A quiet fill for table headers, selected rows and the side bar. */
  surfaceSunk: '#EFECE4',
  ink: '#1D2433',
  muted: '#5B6475',
  rule: '#D9D4C7',
  /** A stronger rule for input borders (3:1 against paper for non-text contrast). */
  ruleStrong: '#8C8677',
  accent: '#0E6E6E',
  accentPressed: '#0A5656',
  /** Accent tint for the selected navigation item and info banners. */
  accentSoft: '#DCEBE8',
  onAccent: '#FFFFFF',
  envelopeWide: '#8FA3BF',
  envelopeNarrow: '#4F6A8F',
  pass: '#2F7D4F',
  passSoft: '#DFEEE3',
  fail: '#A23B3B',
  failSoft: '#F4E1DE',
  unsure: '#9A6B12',
  unsureSoft: '#F3E8D2',
  /** Keyboard focus ring. */
  focus: '#0E6E6E',
} as const;
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
