/**
 * The one palette of Wavefit, named by role, for every place that draws: the client's theme
 * (features/ui/theme.ts) and the PDF report (server/reports/pdf.ts). It follows DESIGN.md "Look":
 * a calm paper background, ink text, one deep teal accent, slate-blue envelope bands, and verdict
 * colours that always travel with a word and an icon.
 */
export const palette = {
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
  /** Border of an accent-tinted badge. */
  accentBorder: '#B5D3CF',
  onAccent: '#FFFFFF',
  envelopeWide: '#8FA3BF',
  envelopeNarrow: '#4F6A8F',
  pass: '#2F7D4F',
  passSoft: '#DFEEE3',
  passBorder: '#B9D7C2',
  fail: '#A23B3B',
  /** A danger button while pressed. */
  failPressed: '#842F2F',
  failSoft: '#F4E1DE',
  failBorder: '#E2BDB8',
  unsure: '#9A6B12',
  unsureSoft: '#F3E8D2',
  unsureBorder: '#E2CFA6',
  /** Keyboard focus ring. */
  focus: '#0E6E6E',
} as const;
export type PaletteRole = keyof typeof palette;
