/**
 * The fit report as a PDF, built on the server with pdfkit from a ReportJson (./reportData.ts).
 * Every chart is drawn as vectors (bands as filled paths, observed values as a line with marked
 * points), with the same geometry as the board (plotSeries in shared/review.ts). Fonts come from
 * fonts/ and are embedded; nothing is fetched. Verdicts always show as a word with a drawn icon.
 */
import { readFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import PDFDocument from 'pdfkit';
import { palette } from '../../shared/palette';
import {
  chartScaleOf,
  formatPValue,
  plotSeries,
  pValueWords,
  VERDICT_WORDS,
  type CompareResponse,
  type ReportJson,
  type ReportStatisticJson,
  type Verdict,
  type VerdictCounts,
} from '../../shared/review';

const FONTS = resolve(__dirname, '../../fonts');

/**
 * A shipped font file, with 16 zero bytes appended. In the IBM Plex Mono files the space glyph is empty
 * and its glyph data would start exactly at the end of the file (the glyf table comes last); the font
 * reader under pdfkit reads a glyph header there and fails. The padding reads as an empty header; the
 * table directory is unchanged, so nothing else in the font moves.
 */
const fontCache = new Map<string, Buffer>();
function fontFile(name: string): Buffer {
  let data = fontCache.get(name);
  if (!data) {
    data = Buffer.concat([readFileSync(join(FONTS, name)), Buffer.alloc(16)]);
    fontCache.set(name, data);
  }
  return data;
}

/** The report's colours: the shared palette (shared/palette.ts) that the screens use too. */
const C = {
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

const VERDICT_COLOUR: Record<Verdict, string> = { pass: C.pass, fail: C.fail, unsure: C.unsure };

type Doc = PDFKit.PDFDocument;

const MARGIN = 50;
const FOOTER_SPACE = 28;

function dateTime(iso: string): string {
  const d = new Date(iso);
  const day = new Intl.DateTimeFormat('en-GB', { day: 'numeric', month: 'long', year: 'numeric', timeZone: 'UTC' }).format(d);
  return `${day}, ${iso.slice(11, 16)} UTC`;
}

function num(x: number | null | undefined, digits = 3): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return '—';
  if (Number.isInteger(x) && Math.abs(x) < 1e6) return String(x);
  return x.toFixed(digits);
}

/** A waves' period in words: "period 1 (spring to midsummer)". */
function periodWords(report: ReportJson, period: number): string {
  const from = report.study.waves[period - 1];
  const to = report.study.waves[period];
  return from && to ? `period ${period} (${from} to ${to})` : `period ${period}`;
}

class Writer {
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
function verdictIcon(doc: Doc, x: number, y: number, size: number, verdict: Verdict | null): void {
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
function countsStrip(w: Writer, counts: VerdictCounts): void {
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

interface Col {
  title: string;
  width: number;
  align?: 'left' | 'right';
  mono?: boolean;
}

/** A simple table; a cell may carry a "better" mark (a small check drawn before the value). */
function table(w: Writer, cols: Col[], rows: { cells: string[]; better?: number[] }[], opts: { caption?: string } = {}): void {
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

/** One envelope chart: shaded bands (widest underneath), the observed values as a line with marked points. */
export function drawEnvelope(doc: Doc, stat: Pick<ReportStatisticJson, 'statistic' | 'components' | 'observed' | 'mean' | 'sd' | 'bands'>, box: { x: number; y: number; w: number; h: number }): void {
  const series = plotSeries({ ...stat, scale: chartScaleOf(stat.statistic) });
  const axisW = 34;
  const labelH = 14;
  const px = box.x + axisW;
  const pw = box.w - axisW;
  const py = box.y;
  const ph = box.h - labelH;
  const n = series.labels.length;
  const step = pw / Math.max(1, n);
  const X = (k: number) => px + (k + 0.5) * step;
  const Y = (v: number) => py + ph - ((v - series.yMin) / (series.yMax - series.yMin)) * ph;

  doc.save();
  // Grid and tick labels.
  doc.lineWidth(0.4).strokeColor(C.rule);
  for (const t of series.ticks) {
    doc.moveTo(px, Y(t)).lineTo(px + pw, Y(t)).stroke();
    doc.font('mono').fontSize(6.5).fillColor(C.muted).text(num(t, Math.abs(t) < 10 ? 1 : 0), box.x, Y(t) - 3.5, { width: axisW - 4, align: 'right', lineBreak: false });
  }
  if (series.scale === 'standardised') {
    doc.lineWidth(0.7).strokeColor(C.muted).moveTo(px, Y(0)).lineTo(px + pw, Y(0)).stroke();
  }
  doc.rect(px, py, pw, ph).lineWidth(0.6).strokeColor(C.rule).stroke();

  // Bands.
  series.bands.forEach((b, idx) => {
    const colour = idx === 0 ? C.wide : C.narrow;
    doc.fillColor(colour).fillOpacity(idx === 0 ? 0.45 : 0.6);
    if (n === 1) {
      doc.rect(X(0) - step * 0.3, Y(b.upper[0]), step * 0.6, Math.max(0.8, Y(b.lower[0]) - Y(b.upper[0]))).fill();
    } else {
      doc.moveTo(X(0), Y(b.upper[0]));
      for (let k = 1; k < n; k++) doc.lineTo(X(k), Y(b.upper[k]));
      for (let k = n - 1; k >= 0; k--) doc.lineTo(X(k), Y(b.lower[k]));
      doc.closePath().fill();
      // A hairline at each band edge keeps a zero-width band visible.
      doc.fillOpacity(1).lineWidth(0.5).strokeColor(colour);
      doc.moveTo(X(0), Y(b.upper[0]));
      for (let k = 1; k < n; k++) doc.lineTo(X(k), Y(b.upper[k]));
      doc.stroke();
      doc.moveTo(X(0), Y(b.lower[0]));
      for (let k = 1; k < n; k++) doc.lineTo(X(k), Y(b.lower[k]));
      doc.stroke();
    }
  });
  doc.fillOpacity(1);

  // Observed line and points.
  doc.lineWidth(1.4).strokeColor(C.accent);
  doc.moveTo(X(0), Y(series.observed[0]));
  for (let k = 1; k < n; k++) doc.lineTo(X(k), Y(series.observed[k]));
  if (n > 1) doc.stroke();
  for (let k = 0; k < n; k++) {
    const x = X(k);
    const y = Y(series.observed[k]);
    if (series.clamped[k]) {
      const up = series.observed[k] > 0;
      doc.fillColor(C.accent).polygon([x - 3.5, y + (up ? 4 : -4)], [x + 3.5, y + (up ? 4 : -4)], [x, y + (up ? -2 : 2)]).fill();
    } else {
      doc.circle(x, y, 2.4).fillColor(C.accent).fill();
    }
    if (series.outside[k]) doc.circle(x, y, 4.6).lineWidth(1).strokeColor(C.accent).stroke();
  }

  // Component labels (every one when they fit, else every second).
  doc.font('mono').fontSize(6.5).fillColor(C.muted);
  const widest = Math.max(...series.labels.map((l) => doc.widthOfString(l)));
  const every = widest + 3 > step ? Math.ceil((widest + 3) / step) : 1;
  series.labels.forEach((l, k) => {
    if (k % every !== 0) return;
    doc.text(l, X(k) - step * every / 2, py + ph + 3, { width: step * every, align: 'center', lineBreak: false });
  });
  doc.restore();
}

function legend(w: Writer, scale: 'counts' | 'standardised', coverages: number[]): void {
  const { doc } = w;
  const y = doc.y;
  let x = w.left + 34;
  const [wide, narrow] = [...coverages].sort((a, b) => b - a);
  const swatch = (colour: string, opacity: number, label: string) => {
    doc.rect(x, y + 1.5, 14, 7).fillColor(colour).fillOpacity(opacity).fill().fillOpacity(1);
    doc.font('text').fontSize(7.5).fillColor(C.muted).text(label, x + 18, y, { lineBreak: false });
    x += 22 + doc.widthOfString(label) + 10;
  };
  swatch(C.wide, 0.45, `middle ${Math.round(wide * 100)}% of simulations`);
  if (narrow !== undefined) swatch(C.narrow, 0.6, `middle ${Math.round(narrow * 100)}%`);
  doc.moveTo(x, y + 5).lineTo(x + 14, y + 5).lineWidth(1.4).strokeColor(C.accent).stroke();
  doc.circle(x + 7, y + 5, 2.2).fillColor(C.accent).fill();
  doc.font('text').fontSize(7.5).fillColor(C.muted).text('observed', x + 18, y, { lineBreak: false });
  x += 18 + doc.widthOfString('observed') + 10;
  doc.circle(x + 5, y + 5, 2.2).fillColor(C.accent).fill();
  doc.circle(x + 5, y + 5, 4.4).lineWidth(0.9).strokeColor(C.accent).stroke();
  doc.font('text').fontSize(7.5).fillColor(C.muted).text(`outside the ${Math.round(wide * 100)}% band`, x + 14, y, { lineBreak: false });
  doc.y = y + 12;
  if (scale === 'standardised') {
    w.text('Drawn standardised: each value as its distance from the simulated mean, in simulated standard deviations (the components differ too much in size to share one axis). A triangle marks a value beyond 6.', {
      size: 7.5,
      colour: C.muted,
      indent: 34,
      gap: 2,
    });
  }
}

function statisticBlock(w: Writer, report: ReportJson, s: ReportStatisticJson): void {
  const { doc } = w;
  w.need(250);
  w.heading(`${s.label}, ${periodWords(report, s.period)}`, 3);
  const y = doc.y;
  drawEnvelope(doc, s, { x: w.left, y, w: w.width, h: 150 });
  doc.y = y + 154;
  legend(w, chartScaleOf(s.statistic), s.bands.map((b) => b.coverage));
  doc.y += 4;
  const words = pValueWords(s.pValue);
  w.text(`p = ${formatPValue(s.pValue)} (Mahalanobis distance ${num(s.distance, 2)}, ${s.chains} chains): ${words.sentence}`, { font: 'bold', size: 9.5, gap: 2 });
  w.text(s.reading, { size: 9, colour: C.ink, gap: 3 });
  if (s.caution) w.text(`Caution: ${s.caution}`, { size: 8.5, colour: C.unsure, gap: 3 });

  // The verdict: icon + word, who and when, the note.
  w.need(30);
  const vy = doc.y + 2;
  const v = s.verdict;
  verdictIcon(doc, w.left, vy, 14, v?.verdict ?? null);
  doc.font('bold').fontSize(10).fillColor(v ? VERDICT_COLOUR[v.verdict] : C.muted).text(v ? `Verdict: ${VERDICT_WORDS[v.verdict]}` : 'Verdict: awaiting review', w.left + 20, vy + 1.5, { continued: !!v });
  if (v) doc.font('text').fontSize(9).fillColor(C.muted).text(`  by ${v.updatedBy?.name ?? 'a former member'}, ${dateTime(v.updatedAt)} (version ${v.version})`);
  doc.y = Math.max(doc.y, vy + 16) + 2;
  if (v?.note) w.text(`“${v.note}”`, { size: 9, indent: 20, gap: 3 });
  if (s.comments.length) {
    w.text(`Comments (${s.comments.length})`, { font: 'bold', size: 8.5, colour: C.muted, indent: 20, gap: 1 });
    for (const c of s.comments) {
      w.text(`${c.author?.name ?? 'A former member'}, ${dateTime(c.createdAt)}: ${c.body}`, { size: 8.5, indent: 28, gap: 2 });
    }
  }
  doc.y += 6;
  w.rule();
}

function comparisonSection(w: Writer, cmp: CompareResponse): void {
  // Keep the heading with the start of its first table.
  w.need(220);
  w.heading('Comparison of models');
  w.text(
    'Each column is a candidate model with its simulation batch. A check marks the better value in a row: for an estimate, the smaller convergence t-ratio in absolute value; for a statistic, the higher p-value.',
    { size: 9, colour: C.muted, gap: 6 },
  );
  const head = (c: CompareResponse['columns'][number]) => `${c.modelName ?? c.label}${c.batchId ? ` (batch ${c.batchId})` : ` (fit ${c.fitId})`}`;
  table(
    w,
    [{ title: 'Parameter', width: 2.2 }, ...cmp.columns.map((c) => ({ title: head(c), width: 1.6, align: 'right' as const, mono: true }))],
    cmp.estimates.map((r) => ({
      cells: [r.label, ...r.cells.map((c) => (c ? `${num(c.value)}${c.se !== null ? ` (${num(c.se)})` : ''}${c.convergenceT !== null ? ` t=${num(c.convergenceT, 2)}` : ''}` : '—'))],
      better: r.better === null ? [] : [r.better + 1],
    })),
    { caption: 'Estimate (standard error) and convergence t-ratio.' },
  );
  table(
    w,
    [{ title: 'Statistic', width: 2.2 }, ...cmp.columns.map((c) => ({ title: head(c), width: 1.6, align: 'right' as const, mono: true }))],
    cmp.pValues.map((r) => ({
      cells: [`${r.label}, period ${r.period}`, ...r.cells.map((c) => (c ? `p = ${formatPValue(c.pValue)}${c.verdict ? ` ${VERDICT_WORDS[c.verdict].toLowerCase()}` : ''}` : '—'))],
      better: r.better === null ? [] : [r.better + 1],
    })),
    { caption: 'Mahalanobis p-value and the team’s verdict per statistic.' },
  );
  table(
    w,
    [{ title: 'Verdicts', width: 2.2 }, ...cmp.columns.map((c) => ({ title: head(c), width: 1.6, align: 'right' as const, mono: true }))],
    (['pass', 'fail', 'unsure', 'awaiting'] as const).map((k) => ({
      cells: [k === 'awaiting' ? 'Awaiting review' : VERDICT_WORDS[k], ...cmp.verdicts.map((v) => (v ? String(v[k]) : '—'))],
    })),
  );
  for (const note of cmp.notes) w.text(`Note: ${note}`, { size: 8.5, colour: C.muted });
}

/** Builds the PDF; resolves with its bytes. */
export function reportPdf(report: ReportJson): Promise<Buffer> {
  const doc = new PDFDocument({
    size: 'A4',
    margins: { top: MARGIN, bottom: MARGIN, left: MARGIN, right: MARGIN },
    bufferPages: true,
    info: {
      Title: `Fit report: ${report.study.name}, ${report.batch.label}`,
      Author: report.signoffs[0]?.signedBy?.name ?? 'Wavefit',
      Subject: 'Goodness of fit of a network panel model',
      Creator: `Wavefit ${report.software.wavefit}`,
    },
  });
  doc.registerFont('text', fontFile('AtkinsonHyperlegible_400Regular.ttf'));
  doc.registerFont('bold', fontFile('AtkinsonHyperlegible_700Bold.ttf'));
  doc.registerFont('mono', fontFile('IBMPlexMono_400Regular.ttf'));
  doc.registerFont('monoMedium', fontFile('IBMPlexMono_500Medium.ttf'));
  const chunks: Buffer[] = [];
  doc.on('data', (c: Buffer) => chunks.push(c));
  const done = new Promise<Buffer>((ok, fail) => {
    doc.on('end', () => ok(Buffer.concat(chunks)));
    doc.on('error', fail);
  });

  const w = new Writer(doc);
  doc.y = MARGIN;
  w.overline('Wavefit · fit report');
  w.heading(report.study.name, 1);
  w.text(`${report.batch.label}${report.model.name ? ` · model “${report.model.name}”` : ''}`, { size: 11, colour: C.muted, gap: 2 });
  w.text(`Generated ${dateTime(report.generatedAt)}`, { size: 9, colour: C.muted, gap: 10 });

  // Sign-off box.
  const latest = report.signoffs[0];
  {
    const lines: { text: string; font: string; size: number; colour: string }[] = [];
    if (latest) {
      lines.push({ text: `Signed off by ${latest.signedBy?.name ?? 'a former member'} on ${dateTime(latest.signedAt)}`, font: 'bold', size: 11, colour: C.ink });
      lines.push({
        text: `Verdicts at signing: ${latest.counts.pass} pass, ${latest.counts.fail} fail, ${latest.counts.unsure} unsure, ${latest.counts.awaiting} awaiting review.`,
        font: 'text',
        size: 9,
        colour: C.muted,
      });
      if (latest.note) lines.push({ text: `“${latest.note}”`, font: 'text', size: 9.5, colour: C.ink });
      if (report.changedSinceSignoff) lines.push({ text: 'Caution: verdicts or comments changed after this sign-off; this copy shows them as they are now.', font: 'bold', size: 9, colour: C.unsure });
    } else {
      lines.push({ text: 'Draft: not signed off', font: 'bold', size: 11, colour: C.unsure });
      lines.push({ text: 'The study lead has not signed off this report yet; verdicts may still change.', font: 'text', size: 9, colour: C.muted });
    }
    const inner = w.width - 24;
    const h = lines.reduce((s, l) => s + doc.font(l.font).fontSize(l.size).heightOfString(l.text, { width: inner, lineGap: 2 }) + 3, 0) + 16;
    const y = doc.y;
    doc.rect(w.left, y, w.width, h).lineWidth(0.8).strokeColor(latest ? C.accent : C.unsure).stroke();
    doc.rect(w.left, y, 4, h).fillColor(latest ? C.accent : C.unsure).fill();
    doc.y = y + 8;
    for (const l of lines) {
      doc.font(l.font).fontSize(l.size).fillColor(l.colour).text(l.text, w.left + 14, doc.y, { width: inner, lineGap: 2 });
      doc.y += 3;
    }
    doc.y = y + h + 12;
  }

  w.heading('Summary');
  countsStrip(w, report.counts);
  const fails = report.statistics.filter((s) => s.verdict?.verdict === 'fail').map((s) => `${s.label.toLowerCase()} (period ${s.period})`);
  const poor = report.statistics.filter((s) => s.pValue < 0.05).map((s) => `${s.label.toLowerCase()} (period ${s.period})`);
  w.text(
    `${report.statistics.length} statistic${report.statistics.length === 1 ? '' : 's'} reviewed over ${report.batch.periods.length} period${report.batch.periods.length === 1 ? '' : 's'}, ${report.batch.chains} simulated chains each. ` +
      (poor.length ? `p below 0.05 for: ${poor.join(', ')}. ` : 'No statistic has p below 0.05. ') +
      (fails.length ? `The team failed: ${fails.join(', ')}.` : 'The team failed none.'),
    { size: 9.5, gap: 6 },
  );

  w.heading('Study');
  if (report.study.description) w.text(report.study.description, { size: 9.5, gap: 4 });
  w.text(`${report.study.actors} actors observed in ${report.study.waves.length} waves: ${report.study.waves.join(', ')}.`, { size: 9.5, gap: 4 });

  w.heading('Model and estimates');
  const m = report.model;
  w.text(
    m.name
      ? `Model “${m.name}”, fit ${report.batch.fitId} (method of moments${m.fitSeed !== null ? `, seed ${m.fitSeed}` : ''}).`
      : report.batch.source === 'hand-entered'
        ? 'Parameter values entered by hand (not estimated).'
        : `Fit ${report.batch.fitId ?? ''}`,
    { size: 9.5, gap: 6 },
  );
  table(
    w,
    [
      { title: 'Parameter', width: 3 },
      { title: 'Estimate', width: 1.2, align: 'right', mono: true },
      { title: 'Std. error', width: 1.2, align: 'right', mono: true },
      { title: 'Convergence t', width: 1.3, align: 'right', mono: true },
    ],
    [
      ...m.rateDetails.filter((r) => r.value !== null).map((r) => ({ cells: [`Rate, ${periodWords(report, r.period)}`, num(r.value), num(r.se), '—'] })),
      ...m.effects.map((e) => ({ cells: [e.label, num(e.value), num(e.se), num(e.convergenceT, 2)] })),
    ],
  );
  if (m.converged !== null) {
    w.text(
      `${m.converged ? 'Converged' : 'Not converged'} by common-practice thresholds (every |t| below 0.1 and the overall maximum convergence ratio below 0.25): largest |t| = ${num(m.maxAbsT, 3)}, overall maximum ratio = ${num(m.tauMax, 3)}.`,
      { size: 9, colour: m.converged ? C.ink : C.fail, gap: 6 },
    );
  }

  w.heading('Goodness of fit');
  w.text(
    `For each auxiliary statistic the model was simulated ${report.batch.chains} times from the observed start wave of each period. The shaded bands hold the middle ${report.statistics[0]?.bands.map((b) => `${Math.round(b.coverage * 100)}%`).join(' and ') ?? ''} of the simulated values of each component; the line with points is the observed end wave. The p-value is the share of simulated networks at least as far (in Mahalanobis distance) from the average as the observed one, the observed network being counted with the simulated ones in the average and spread so that it is treated exactly like them; the form that leaves it out is given when the two disagree.`,
    { size: 9, colour: C.muted, gap: 8 },
  );
  for (const s of report.statistics) statisticBlock(w, report, s);

  if (report.comparison) comparisonSection(w, report.comparison);

  w.need(260);
  w.heading('Reproducibility');
  const sw = report.software;
  table(
    w,
    [
      { title: 'Item', width: 2 },
      { title: 'Value', width: 3, mono: true },
    ],
    [
      { cells: ['Batch', `${report.batch.id}: ${report.batch.label}`] },
      { cells: ['Batch seed', String(report.batch.seed)] },
      { cells: ['Chains per period', String(report.batch.chains)] },
      { cells: ['Periods simulated', report.batch.periods.join(', ')] },
      ...(m.fitSeed !== null ? [{ cells: ['Fit seed', String(m.fitSeed)] }] : []),
      { cells: ['Run by', report.batch.createdBy ?? '—'] },
      { cells: ['Finished', report.batch.finishedAt ? dateTime(report.batch.finishedAt) : '—'] },
      { cells: ['Wavefit', sw.wavefit] },
      { cells: ['Node.js', sw.node] },
    ],
  );
  w.text('Installed packages that compute, store and draw these numbers:', { size: 9, colour: C.muted, gap: 2 });
  w.text(
    Object.entries(sw.packages)
      .map(([k, v]) => `${k} ${v}`)
      .join(' · '),
    { font: 'mono', size: 8.5, gap: 4 },
  );
  w.text('Running the same batch seed with the same versions reproduces every simulated network, and so every number in this report.', { size: 9, colour: C.muted });

  // Footers with page numbers.
  const range = doc.bufferedPageRange();
  for (let i = range.start; i < range.start + range.count; i++) {
    doc.switchToPage(i);
    doc.page.margins.bottom = 0;
    const y = doc.page.height - MARGIN - 10;
    doc.moveTo(MARGIN, y - 6).lineTo(doc.page.width - MARGIN, y - 6).lineWidth(0.4).strokeColor(C.rule).stroke();
    doc
      .font('text')
      .fontSize(7.5)
      .fillColor(C.muted)
      .text(`Wavefit fit report · ${report.study.name} · ${report.batch.label}`, MARGIN, y, { width: w.width - 80, lineBreak: false, height: 10 });
    doc.text(`page ${i - range.start + 1} of ${range.count}`, doc.page.width - MARGIN - 80, y, { width: 80, align: 'right', lineBreak: false, height: 10 });
  }
  doc.end();
  return done;
}
