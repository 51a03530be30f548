/**
 * The PDF report's charts, drawn as vectors with the board's geometry (plotSeries in
 * shared/review.ts): the envelope chart of one statistic and its legend.
 */
import { chartScaleOf, plotSeries, type ReportStatisticJson } from '../../shared/review';
import { C, num, type Doc, type Writer } from './pdfLayout';

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

export function legend(w: Writer, scale: 'counts' | 'standardised', coverages: number[]): void {
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
