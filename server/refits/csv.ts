/**
 * CSV of a re-fit study (RFC 4180, CRLF line ends): the summary (one row per group and parameter) and
 * every re-fit (one row per re-fit and parameter). Text cells that a spreadsheet would read as a
 * formula (starting with =, +, -, @, tab or carriage return) get a leading apostrophe; numbers are
 * written as numbers (the shared helper shared/csvSafe.ts).
 */
import { csvCell, type CsvValue } from '../../shared/csvSafe';
import type { RefitResults } from '../../shared/refits';
import type { StoredRefitModel } from './context';
import type { RefitRow } from './summary';

const line = (values: (CsvValue | boolean)[]) => values.map((v) => csvCell(typeof v === 'boolean' ? (v ? 1 : 0) : v)).join(',');

export function refitSummaryCsv(results: RefitResults): string {
  const models = results.refit.models;
  const rows = [
    line(['refit_study', 'source_model', 'fitted_model', 'parameter', 'label', 'truth', 'refits_used', 'refits', 'converged', 'mean_estimate', 'bias', 'bias_mc_error', 'sd', 'sd_mc_error', 'mean_se', 'mean_se_mc_error', 'sd_over_mean_se', 'sd_over_mean_se_mc_error', 'coverage95', 'coverage95_mc_error']),
  ];
  for (const g of results.groups) {
    for (const q of g.parameters) {
      rows.push(
        line([
          results.refit.id,
          models[g.source].name,
          models[g.target].name,
          q.key,
          q.label,
          q.truth,
          q.count,
          g.refits,
          g.converged,
          q.meanEstimate,
          q.bias.value,
          q.bias.mcError,
          q.sd.value,
          q.sd.mcError,
          q.meanSe.value,
          q.meanSe.mcError,
          q.ratio.value,
          q.ratio.mcError,
          q.coverage.value,
          q.coverage.mcError,
        ]),
      );
    }
  }
  return rows.join('\r\n') + '\r\n';
}

export function refitRowsCsv(refitId: number, models: StoredRefitModel[], rows: RefitRow[]): string {
  const out = [line(['refit_study', 'source_model', 'fitted_model', 'replication', 'finished', 'converged', 'parameter', 'estimate', 'se', 'error'])];
  for (const r of rows) {
    const info = models[r.target].info;
    info.keys.forEach((key, k) => {
      out.push(
        line([refitId, models[r.source].info.name, info.name, r.replication + 1, r.finished, r.converged, key, r.finished ? r.estimates[k] : null, r.finished ? r.ses[k] : null, r.error]),
      );
    });
  }
  return out.join('\r\n') + '\r\n';
}
