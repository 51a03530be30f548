/**
 * CSV exports of a fit report's numbers (RFC 4180: comma-separated, fields with commas, quotes or
 * line breaks quoted, CRLF line ends; text that would start a formula neutralised by
 * shared/csvSafe.ts): the goodness-of-fit table (one row per statistic, period and component, with
 * the newest sign-off and any acknowledged concerns and reason on every row) and the estimates table
 * (one row per parameter).
 */
import { csvLine as line } from '../../shared/csvSafe';
import type { ReportJson } from '../../shared/review';

export function gofCsv(report: ReportJson): string {
  const coverages = report.statistics[0]?.bands.map((b) => b.coverage).sort((a, b) => a - b) ?? [];
  const bandCols = coverages.flatMap((c) => [`band${Math.round(c * 100)}_lower`, `band${Math.round(c * 100)}_upper`]);
  const rows = [
    line(['batch', 'statistic', 'period', 'component', 'observed', 'simulated_mean', 'simulated_sd', ...bandCols, 'p_value', 'p_value_simulated_only', 'mahalanobis_distance', 'chains', 'verdict', 'verdict_note', 'verdict_by', 'verdict_at', 'signed_off_by', 'signed_off_at', 'signoff_concerns', 'signoff_reason']),
  ];
  // The newest sign-off, repeated on every row (empty when not signed); concerns and reason only when acknowledged.
  const signoff = report.signoffs[0];
  const signoffFields = [
    signoff ? (signoff.signedBy?.name ?? 'a former member') : '',
    signoff?.signedAt ?? '',
    signoff?.acknowledgement?.concerns.map((c) => c.message).join(' ') ?? '',
    signoff?.acknowledgement?.reason ?? '',
  ];
  for (const s of report.statistics) {
    s.components.forEach((component, k) => {
      const bands = coverages.flatMap((c) => {
        const b = s.bands.find((x) => x.coverage === c)!;
        return [b.lower[k], b.upper[k]];
      });
      rows.push(
        line([
          report.batch.id,
          s.statistic,
          s.period,
          component,
          s.observed[k],
          s.mean[k],
          s.sd[k],
          ...bands,
          s.pValue,
          s.pValueSimulatedOnly,
          s.distance,
          s.chains,
          s.verdict?.verdict ?? '',
          s.verdict?.note ?? '',
          s.verdict?.updatedBy?.name ?? '',
          s.verdict?.updatedAt ?? '',
          ...signoffFields,
        ]),
      );
    });
  }
  return rows.join('\r\n') + '\r\n';
}

export function estimatesCsv(report: ReportJson): string {
  const rows = [line(['batch', 'fit', 'parameter', 'label', 'value', 'standard_error', 'convergence_t'])];
  for (const r of report.model.rateDetails) {
    if (r.value !== null) rows.push(line([report.batch.id, report.batch.fitId, `rate:${r.period}`, `Rate, period ${r.period}`, r.value, r.se, null]));
  }
  for (const e of report.model.effects) rows.push(line([report.batch.id, report.batch.fitId, e.key, e.label, e.value, e.se, e.convergenceT]));
  return rows.join('\r\n') + '\r\n';
}
