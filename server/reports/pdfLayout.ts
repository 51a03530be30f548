/**
 * The PDF report's layout primitives (pdfkit): the shipped fonts, the colours (from the shared
 * palette), page margins, the Writer that flows text and starts pages, drawn verdict icons, the
 * verdict counts strip and tables. The report's sections are in ./pdf.ts, its charts in ./pdfChart.ts.
 */
import { readFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { palette } from '../../shared/palette';
import type { Verdict, VerdictCounts } from '../../shared/review';

const FONTS = resolve(__dirname, '../../fonts');

/**
 * A shipped font file, with 16 zero bytes appended. In the IBM Plex Mono files the space glyph is empty
 * and its glyph data would start exactly at the end of the file (the glyf table comes last); the font
 * reader under pdfkit reads a glyph header there and fails. The padding reads as an empty header; the
 * table directory is unchanged, so nothing else in the font moves.
 */
const fontCache = new Map<string, Buffer>();

export function fontFile(name: string): Buffer {
  let data = fontCache.get(name);
  if (!data) {
    data = Buffer.concat([readFileSync(join(FONTS, name)), Buffer.alloc(16)]);
    fontCache.set(name, data);
  }
  return data;
}

/** The report's colours: the shared palette (shared/palette.ts) that the screens use too. */
export const C = {
  ink: palette.ink,
  muted: palette.muted,
  rule: palette.rule,
  sunk: palette.surfaceSunk,
  accent: palette.accent,
  wide: palette.envelopeWide,
  narrow: palette.envelopeNarrow,
  pass: palette.pass,
  fail: palette.fail,
  unsure: palette.unsure,
  awaiting: palette.muted,
};

export const VERDICT_COLOUR: Record<Verdict, string> = { pass: C.pass, fail: C.fail, unsure: C.unsure };

export type Doc = PDFKit.PDFDocument;

export const MARGIN = 50;

export const FOOTER_SPACE = 28;

export function dateTime(iso: string): string {
  const d = new Date(iso);
  const day = new Intl.DateTimeFormat('en-GB', { day: 'numeric', month: 'long', year: 'numeric', timeZone: 'UTC' }).format(d);
  return `${day}, ${iso.slice(11, 16)} UTC`;
}

export function num(x: number | null | undefined, digits = 3): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return '—';
  if (Number.isInteger(x) && Math.abs(x) < 1e6) return String(x);
  return x.toFixed(digits);
}

export class Writer {
  readonly doc: Doc;
  readonly left = MARGIN;
  readonly width: number;
  readonly bottom: number;

  constructor(doc: Doc) {
    this.doc = doc;
    this.width = doc.page.width - 2 * MARGIN;
    this.bottom = doc.page.height - MARGIN - FOOTER_SPACE;
  }

  /** Starts a new page when fewer than h points are left. */
  need(h: number): void {
    if (this.doc.y + h > this.bottom) {
      this.doc.addPage();
      this.doc.y = MARGIN;
    }
  }

  text(str: string, opts: { font?: string; size?: number; colour?: string; gap?: number; indent?: number; width?: number; continued?: boolean } = {}): void {
    const { doc } = this;
    doc.font(opts.font ?? 'text').fontSize(opts.size ?? 10).fillColor(opts.colour ?? C.ink);
    const width = opts.width ?? this.width - (opts.indent ?? 0);
    const h = doc.heightOfString(str, { width, lineGap: 2 });
    this.need(Math.min(h, 60));
    doc.text(str, this.left + (opts.indent ?? 0), doc.y, { width, lineGap: 2 });
    doc.y += opts.gap ?? 4;
  }

  heading(str: string, level: 1 | 2 | 3 = 2): void {
    const size = level === 1 ? 22 : level === 2 ? 15 : 12;
    this.need(level === 3 ? 40 : 70);
    if (level === 2) this.doc.y += 8;
    this.text(str, { font: 'bold', size, gap: level === 1 ? 4 : 6 });
  }

  overline(str: string): void {
    this.text(str.toUpperCase(), { font: 'bold', size: 8, colour: C.muted, gap: 2 });
  }

  rule(): void {
    const { doc } = this;
    doc.moveTo(this.left, doc.y).lineTo(this.left + this.width, doc.y).lineWidth(0.6).strokeColor(C.rule).stroke();
    doc.y += 8;
  }
}

/** A verdict icon drawn as vectors: a circle with a check, a cross or a question mark. */
export function verdictIcon(doc: Doc, x: number, y: number, size: number, verdict: Verdict | null): void {
  const r = size / 2;
  const cx = x + r;
  const cy = y + r;
  const colour = verdict ? VERDICT_COLOUR[verdict] : C.awaiting;
  doc.save();
  doc.lineWidth(Math.max(0.8, size / 12)).strokeColor(colour).lineCap('round').lineJoin('round');
  if (verdict === null) {
    doc.circle(cx, cy, r * 0.85).dash(1.2, { space: 1.4 }).stroke().undash();
    doc.restore();
    return;
  }
  doc.circle(cx, cy, r * 0.85).stroke();
  const s = r / 9;
  if (verdict === 'pass') {
    doc.moveTo(cx - 4 * s, cy + 0.4 * s).lineTo(cx - 1.2 * s, cy + 3.2 * s).lineTo(cx + 4.2 * s, cy - 2.4 * s).stroke();
  } else if (verdict === 'fail') {
    doc.moveTo(cx - 3 * s, cy - 3 * s).lineTo(cx + 3 * s, cy + 3 * s).stroke();
    doc.moveTo(cx + 3 * s, cy - 3 * s).lineTo(cx - 3 * s, cy + 3 * s).stroke();
  } else {
    doc
      .moveTo(cx - 2.4 * s, cy - 2.4 * s)
      .bezierCurveTo(cx - 2.4 * s, cy - 5.4 * s, cx + 2.8 * s, cy - 5.4 * s, cx + 2.6 * s, cy - 2.2 * s)
      .bezierCurveTo(cx + 2.4 * s, cy - 0.4 * s, cx, cy - 0.2 * s, cx, cy + 1.6 * s)
      .stroke();
    doc.circle(cx, cy + 4.2 * s, 0.9 * s).fillColor(colour).fill();
  }
  doc.restore();
}

/** The verdict counts as a strip of word + icon + number. */
export function countsStrip(w: Writer, counts: VerdictCounts): void {
  const { doc } = w;
  w.need(44);
  const y = doc.y;
  const items: { label: string; n: number; v: Verdict | null }[] = [
    { label: 'Pass', n: counts.pass, v: 'pass' },
    { label: 'Fail', n: counts.fail, v: 'fail' },
    { label: 'Unsure', n: counts.unsure, v: 'unsure' },
    { label: 'Awaiting review', n: counts.awaiting, v: null },
  ];
  const cell = w.width / items.length;
  items.forEach((it, k) => {
    const x = w.left + k * cell;
    doc.rect(x + 2, y, cell - 4, 38).lineWidth(0.6).strokeColor(C.rule).stroke();
    verdictIcon(doc, x + 10, y + 11, 16, it.v);
    doc.font('monoMedium').fontSize(16).fillColor(C.ink).text(String(it.n), x + 32, y + 5, { width: cell - 40, lineBreak: false });
    doc.font('text').fontSize(8.5).fillColor(C.muted).text(it.label, x + 32, y + 24, { width: cell - 40, lineBreak: false });
  });
  doc.y = y + 46;
}

export interface Col {
  title: string;
  width: number;
  align?: 'left' | 'right';
  mono?: boolean;
}

/** A simple table; a cell may carry a "better" mark (a small check drawn before the value). */
export function table(w: Writer, cols: Col[], rows: { cells: string[]; better?: number[] }[], opts: { caption?: string } = {}): void {
  const { doc } = w;
  const total = cols.reduce((s, c) => s + c.width, 0);
  const scale = w.width / total;
  const widths = cols.map((c) => c.width * scale);
  const xs = widths.map((_, k) => w.left + widths.slice(0, k).reduce((s, v) => s + v, 0));
  const rowHeight = (cells: string[], font: string, size: number) =>
    Math.max(...cells.map((c, k) => doc.font(cols[k].mono && font !== 'bold' ? 'mono' : font).fontSize(size).heightOfString(c, { width: widths[k] - 8 }))) + 8;
  const header = () => {
    const h = rowHeight(cols.map((c) => c.title), 'bold', 8.5);
    const y0 = doc.y;
    doc.rect(w.left, y0, w.width, h).fillColor(C.sunk).fill();
    cols.forEach((c, k) => {
      doc.font('bold').fontSize(8.5).fillColor(C.muted).text(c.title, xs[k] + 4, y0 + 4, { width: widths[k] - 8, align: c.align ?? 'left' });
    });
    doc.y = y0 + h;
  };
  w.need(40);
  header();
  for (const row of rows) {
    const h = rowHeight(row.cells, 'text', 9);
    if (doc.y + h > w.bottom) {
      doc.addPage();
      doc.y = MARGIN;
      header();
    }
    const y = doc.y;
    row.cells.forEach((cell, k) => {
      const better = row.better?.includes(k);
      const col = cols[k];
      const font = col.mono ? (better ? 'monoMedium' : 'mono') : better ? 'bold' : 'text';
      doc.font(font).fontSize(9).fillColor(C.ink);
      if (better) {
        const tw = doc.widthOfString(cell);
        const iconX = col.align === 'right' ? xs[k] + widths[k] - 4 - tw - 12 : xs[k] + 4;
        verdictIcon(doc, iconX, y + 4.5, 9, 'pass');
        doc.text(cell, col.align === 'right' ? xs[k] + 4 : xs[k] + 16, y + 4, { width: widths[k] - (col.align === 'right' ? 8 : 20), align: col.align ?? 'left' });
      } else {
        doc.text(cell, xs[k] + 4, y + 4, { width: widths[k] - 8, align: col.align ?? 'left' });
      }
    });
    doc.y = y + h;
    doc.moveTo(w.left, doc.y).lineTo(w.left + w.width, doc.y).lineWidth(0.4).strokeColor(C.rule).stroke();
  }
  doc.y += 4;
  if (opts.caption) w.text(opts.caption, { size: 8.5, colour: C.muted, gap: 6 });
}
