/**
 * The fit report as a PDF, built on the server with pdfkit from a ReportJson (./reportData.ts).
 * Every chart is drawn as vectors (bands as filled paths, observed values as a line with marked
 * points), with the same geometry as the board (plotSeries in shared/review.ts). Fonts come from
 * fonts/ and are embedded; nothing is fetched. Verdicts always show as a word with a drawn icon.
 * This file holds the report's sections; the layout primitives are in ./pdfLayout.ts, the charts in
 * ./pdfChart.ts.
 */
import PDFDocument from 'pdfkit';
import type { McValue, RefitResults } from '../../shared/refits';
import {
  chartScaleOf,
  formatPValue,
  pValueWords,
  VERDICT_WORDS,
  type CompareResponse,
  type ReportJson,
  type ReportStatisticJson,
} from '../../shared/review';
import { drawEnvelope, legend } from './pdfChart';
import { C, countsStrip, dateTime, fontFile, MARGIN, num, table, VERDICT_COLOUR, verdictIcon, Writer } from './pdfLayout';

/** A waves' period in words: "period 1 (spring to midsummer)". */
function periodWords(report: ReportJson, period: number): string {
  const from = report.study.waves[period - 1];
  const to = report.study.waves[period];
  return from && to ? `period ${period} (${from} to ${to})` : `period ${period}`;
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
  for (const l of s.lineups) {
    w.text(`Lineup test (${l.panels} panels, seed ${l.seed}): ${l.result.reading}`, { size: 8.5, indent: 20, gap: 1 });
    if (l.result.caution) w.text(`Caution: ${l.result.caution}`, { size: 8, colour: C.unsure, indent: 20, gap: 2 });
  }
  doc.y += 6;
  w.rule();
}

/** All periods together: each statistic summed over the periods, chart and test (no verdicts). */
function allPeriodsSection(w: Writer, report: ReportJson): void {
  const { doc } = w;
  w.need(280);
  w.heading('All periods together');
  w.text(
    `Each chain's statistics summed over periods ${report.batch.periods.join(', ')}, and the observed end waves' too, then the same bands and test. One test over the whole study: a period that fits badly can hide behind one that fits well, so read it beside the periods. The verdicts above stay per period.`,
    { size: 9, colour: C.muted, gap: 8 },
  );
  for (const s of report.allPeriods ?? []) {
    w.need(230);
    w.heading(`${s.label}, all periods together`, 3);
    const y = doc.y;
    drawEnvelope(doc, s, { x: w.left, y, w: w.width, h: 150 });
    doc.y = y + 154;
    legend(w, chartScaleOf(s.statistic), s.bands.map((b) => b.coverage));
    doc.y += 4;
    w.text(`p = ${formatPValue(s.pValue)} (Mahalanobis distance ${num(s.distance, 2)}, ${s.chains} chains): ${pValueWords(s.pValue).sentence}`, { font: 'bold', size: 9.5, gap: 2 });
    w.text(s.reading, { size: 9, colour: C.ink, gap: 3 });
    if (s.caution) w.text(`Caution: ${s.caution}`, { size: 8.5, colour: C.unsure, gap: 3 });
    doc.y += 6;
    w.rule();
  }
}

function comparisonSection(w: Writer, cmp: CompareResponse): void {
  // Keep the heading with the start of its first table.
  w.need(220);
  w.heading('Comparison of models');
  w.text(
    'Each column is a candidate model with its simulation batch. Estimates carry their standard error and the t-statistic estimate / SE with its significance; convergence is a separate line per model. A check marks a p-value only where it is higher than the others beyond Monte Carlo error.',
    { size: 9, colour: C.muted, gap: 6 },
  );
  const head = (c: CompareResponse['columns'][number]) => `${c.modelName ?? c.label}${c.batchId ? ` (batch ${c.batchId})` : ` (fit ${c.fitId})`}`;
  const colsOf = (first: string) => [{ title: first, width: 2.2 }, ...cmp.columns.map((c) => ({ title: head(c), width: 1.6, align: 'right' as const, mono: true }))];
  table(w, colsOf('Convergence'), [
    {
      cells: ['Fit converged', ...cmp.columns.map((c) => (c.converged === null ? 'no check' : `${c.converged ? 'pass' : 'FAIL'} (max |t| ${num(c.maxAbsT, 2)})`))],
    },
  ]);
  table(
    w,
    colsOf('Parameter'),
    cmp.estimates.map((r) => ({
      cells: [
        r.label,
        ...r.cells.map((c) => (c ? `${num(c.value)}${c.se !== null ? ` (${num(c.se)})` : ''}${c.t !== null ? ` t=${num(c.t, 2)}${c.significance === 'none' ? '' : c.significance === 'p1' ? '**' : '*'}` : ''}` : '—')),
      ],
    })),
    { caption: 'Estimate (standard error) and t = estimate / SE; * significant at 5%, ** at 1% (normal quantiles). Rates are not tested.' },
  );
  table(
    w,
    colsOf('Statistic'),
    cmp.pValues.map((r) => ({
      cells: [
        `${r.label}, period ${r.period}`,
        ...r.cells.map((c) => (c ? `p = ${formatPValue(c.pValue)} ± ${c.mcSe.toFixed(3)}${c.verdict ? ` ${VERDICT_WORDS[c.verdict].toLowerCase()}` : ''}` : '—')),
      ],
      better: r.better === null ? [] : [r.better + 1],
    })),
    { caption: `Mahalanobis p-value ± its Monte Carlo standard error, and the team’s verdict. ${cmp.betterRule}` },
  );
  table(w, colsOf('Overall'), [
    { cells: ['Failing at 0.05', ...cmp.overall.map((o) => (o ? `${o.failing} of ${o.tested}` : '—'))] },
    { cells: ['Summed distance', ...cmp.overall.map((o) => (o?.distanceSum != null ? num(o.distanceSum, 1) : '—'))] },
  ], { caption: 'Caution: the p-values of different statistics come from the same chains and are not independent; these counts are not a joint test.' });
  table(
    w,
    [{ title: 'Verdicts', width: 2.2 }, ...cmp.columns.map((c) => ({ title: head(c), width: 1.6, align: 'right' as const, mono: true }))],
    (['pass', 'fail', 'unsure', 'awaiting'] as const).map((k) => ({
      cells: [k === 'awaiting' ? 'Awaiting review' : VERDICT_WORDS[k], ...cmp.verdicts.map((v) => (v ? String(v[k]) : '—'))],
    })),
  );
  for (const note of cmp.notes) w.text(`Note: ${note}`, { size: 8.5, colour: C.muted });
}

function refitSection(w: Writer, study: RefitResults): void {
  w.need(220);
  w.heading('Re-fit study');
  const r = study.refit;
  w.text(
    `${r.label}: ${r.replications} panels simulated from each chosen fit (seed ${r.seed}), from the observed first wave, and the model fitted again to each. ` +
      'Figures over the converged re-fits; each with its Monte Carlo error (plus or minus one standard error over the re-fits). ' +
      'SD / mean SE near 1 means the standard errors are about right; coverage near 95% means the intervals can be trusted.',
    { size: 9, colour: C.muted, gap: 6 },
  );
  const mc = (v: McValue, d = 3) => (v.value === null ? '—' : `${v.value.toFixed(d)} ± ${v.mcError === null ? '—' : v.mcError.toFixed(d)}`);
  for (const g of study.groups) {
    w.need(120);
    w.text(g.title, { size: 10, gap: 2 });
    w.text(`${g.converged} of ${g.refits} re-fits converged${g.failed ? `; ${g.failed} failed` : ''}.`, { size: 9, colour: C.muted, gap: 4 });
    table(
      w,
      [
        { title: 'Parameter', width: 2 },
        { title: 'Generating', width: 1, align: 'right', mono: true },
        { title: 'Bias', width: 1.4, align: 'right', mono: true },
        { title: 'SD', width: 1.4, align: 'right', mono: true },
        { title: 'Mean SE', width: 1.4, align: 'right', mono: true },
        { title: 'SD / SE', width: 1.2, align: 'right', mono: true },
        { title: '95% coverage', width: 1.3, align: 'right', mono: true },
      ],
      g.parameters.map((q) => ({
        cells: [q.label, num(q.truth), mc(q.bias), mc(q.sd), mc(q.meanSe), mc(q.ratio, 2), q.coverage.value === null ? '—' : `${(q.coverage.value * 100).toFixed(0)}% ± ${((q.coverage.mcError ?? 0) * 100).toFixed(0)}`],
      })),
    );
    for (const c of g.cautions) w.text(`Caution: ${c}`, { size: 8.5, colour: C.unsure });
  }
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
      if (latest.acknowledgement) {
        lines.push({ text: 'Signed off despite these concerns:', font: 'bold', size: 9.5, colour: C.unsure });
        for (const c of latest.acknowledgement.concerns) lines.push({ text: `• ${c.message}`, font: 'text', size: 9, colour: C.ink });
        lines.push({ text: `Reason given: “${latest.acknowledgement.reason}”`, font: 'text', size: 9.5, colour: C.ink });
      }
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
  if (report.allPeriods) allPeriodsSection(w, report);

  if (report.comparison) comparisonSection(w, report.comparison);
  if (report.refitStudy) refitSection(w, report.refitStudy);

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
