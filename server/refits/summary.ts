/**
 * The summaries of a re-fit study, from its stored rows (pure: no database).
 *
 * Per group (a target model re-fitted to the panels simulated from a source model) and estimated
 * parameter: bias of the mean estimate against the data-generating value, the SD of the estimates,
 * the mean standard error, SD / mean SE, and the share of 95% Wald intervals (estimate +- 1.96 SE)
 * covering the generating value, each with its Monte Carlo standard error; the share of converged
 * re-fits; the pairwise Pearson correlations of the estimates across re-fits; cautions in words.
 *
 * Monte Carlo errors (Morris, White & Crowther 2019, Using simulation studies to evaluate statistical
 * methods, Statistics in Medicine 38, table 6; from memory): bias SD / sqrt(R); SD of estimates
 * SD / sqrt(2 (R - 1)) (normal estimates); mean SE sd(SE) / sqrt(R); coverage sqrt(c (1 - c) / R)
 * (at c = 0 or 1, sqrt(0.95 * 0.05 / R), the error at the nominal level);
 * the ratio by the delta method, treating the SD and the mean SE as independent.
 * The generating value of an effect the source model does not have is 0.
 */
import { HIGH_REFIT_CORRELATION, LOW_CONVERGENCE_SHARE, type RefitGroup, type RefitParameterSummary } from '../../shared/refits';
import type { StoredRefitModel } from './context';

export interface RefitRow {
  source: number;
  target: number;
  replication: number;
  finished: boolean;
  converged: boolean;
  estimates: Float64Array;
  ses: Float64Array;
  error: string | null;
}

const Z95 = 1.959963984540054;

function mean(xs: number[]): number {
  return xs.reduce((s, x) => s + x, 0) / xs.length;
}

function sampleSd(xs: number[]): number {
  if (xs.length < 2) return Number.NaN;
  const m = mean(xs);
  return Math.sqrt(xs.reduce((s, x) => s + (x - m) ** 2, 0) / (xs.length - 1));
}

export function pearson(x: number[], y: number[]): number | null {
  const n = x.length;
  if (n < 3) return null;
  const mx = mean(x);
  const my = mean(y);
  let sxy = 0;
  let sxx = 0;
  let syy = 0;
  for (let k = 0; k < n; k++) {
    sxy += (x[k] - mx) * (y[k] - my);
    sxx += (x[k] - mx) ** 2;
    syy += (y[k] - my) ** 2;
  }
  if (!(sxx > 0) || !(syy > 0)) return null;
  return sxy / Math.sqrt(sxx * syy);
}

const fin = (x: number): number | null => (Number.isFinite(x) ? x : null);
const fmt = (x: number, digits = 3) => x.toFixed(digits);

/** Figures of one parameter over the chosen re-fits. */
export function parameterSummary(key: string, label: string, truth: number, estimates: number[], ses: number[]): RefitParameterSummary {
  const R = estimates.length;
  const withSe = ses.map((s, k) => ({ s, e: estimates[k] })).filter((x) => Number.isFinite(x.s));
  const sd = sampleSd(estimates);
  const seVals = withSe.map((x) => x.s);
  const meanSe = seVals.length ? mean(seVals) : Number.NaN;
  const sdSe = sampleSd(seVals);
  const covered = withSe.filter((x) => Math.abs(x.e - truth) <= Z95 * x.s).length;
  const coverage = withSe.length ? covered / withSe.length : Number.NaN;
  const ratio = sd / meanSe;
  const ratioMc = ratio * Math.sqrt(1 / (2 * (R - 1)) + (sdSe * sdSe) / (seVals.length * meanSe * meanSe));
  const meanEstimate = R ? mean(estimates) : Number.NaN;
  return {
    key,
    label,
    truth,
    count: R,
    meanEstimate: fin(meanEstimate),
    bias: { value: fin(meanEstimate - truth), mcError: fin(sd / Math.sqrt(R)) },
    sd: { value: fin(sd), mcError: fin(sd / Math.sqrt(2 * (R - 1))) },
    meanSe: { value: fin(meanSe), mcError: fin(sdSe / Math.sqrt(seVals.length)) },
    ratio: { value: fin(ratio), mcError: fin(ratioMc) },
    // At 0% or 100% the binomial formula gives 0; the error the nominal 95% would have is shown instead.
    coverage: { value: fin(coverage), mcError: fin(Math.sqrt((coverage > 0 && coverage < 1 ? coverage * (1 - coverage) : 0.95 * 0.05) / withSe.length)) },
    estimates,
  };
}

function groupTitle(models: StoredRefitModel[], s: number, t: number): string {
  return s === t ? `${models[t].info.name} re-fitted to its own simulated panels` : `${models[t].info.name} fitted to panels simulated from ${models[s].info.name}`;
}

/** Every group of the study, in (source, target) order, from the stored rows. */
export function summariseRefits(models: StoredRefitModel[], rows: RefitRow[], include: 'converged' | 'all', cross: boolean): RefitGroup[] {
  const groups: RefitGroup[] = [];
  for (let s = 0; s < models.length; s++) {
    for (let t = 0; t < models.length; t++) {
      if (!cross && s !== t) continue;
      const mine = rows.filter((r) => r.source === s && r.target === t).sort((a, b) => a.replication - b.replication);
      const finished = mine.filter((r) => r.finished);
      const converged = finished.filter((r) => r.converged);
      const used = include === 'converged' ? converged : finished;
      const source = models[s].info;
      const target = models[t].info;
      const truthOf = (key: string) => {
        const k = source.keys.indexOf(key);
        return k >= 0 ? source.values[k] : 0;
      };
      const parameters: RefitParameterSummary[] = [];
      target.keys.forEach((key, k) => {
        if (!target.estimated[k]) return;
        const est = used.map((r) => r.estimates[k]).filter(Number.isFinite);
        const ses = used.filter((r) => Number.isFinite(r.estimates[k])).map((r) => r.ses[k]);
        parameters.push(parameterSummary(key, target.labels[k], truthOf(key), est, ses));
      });
      const correlations = [];
      for (let a = 0; a < parameters.length; a++) {
        for (let b = a + 1; b < parameters.length; b++) {
          const r = pearson(parameters[a].estimates, parameters[b].estimates);
          correlations.push({ a: parameters[a].key, b: parameters[b].key, r, flagged: r !== null && Math.abs(r) > HIGH_REFIT_CORRELATION });
        }
      }
      const cautions: string[] = [];
      const share = mine.length ? converged.length / mine.length : null;
      if (share !== null && share < LOW_CONVERGENCE_SHARE) {
        cautions.push(
          `Only ${converged.length} of ${mine.length} re-fits (${Math.round(share * 100)}%) converged (every |t| < 0.1 and overall maximum convergence ratio < 0.25). ` +
            (include === 'converged'
              ? 'The figures use the converged ones alone, which may flatter the model.'
              : 'The figures include re-fits that did not converge; their estimates may be off.'),
        );
      }
      const failedCount = mine.length - finished.length;
      if (failedCount > 0) cautions.push(`${failedCount} re-fit${failedCount === 1 ? '' : 's'} failed (the estimation stopped) and ${failedCount === 1 ? 'is' : 'are'} left out.`);
      if (used.length < 20) cautions.push(`Only ${used.length} re-fit${used.length === 1 ? '' : 's'} enter the figures; their Monte Carlo errors are large.`);
      for (const c of correlations) {
        if (c.flagged) {
          const la = parameters.find((q) => q.key === c.a)!.label;
          const lb = parameters.find((q) => q.key === c.b)!.label;
          cautions.push(
            `The estimates of ${la} and ${lb} move together across re-fits (r = ${fmt(c.r!, 2)}): the data hardly tell these two apart, so read them together.`,
          );
        }
      }
      for (const q of parameters) {
        const b = q.bias.value;
        const e = q.bias.mcError;
        if (b !== null && e !== null && e > 0 && Math.abs(b) > 3 * e) {
          cautions.push(
            `${q.label}: the re-fits are biased: mean estimate ${fmt(q.meanEstimate!)} against ${fmt(q.truth)} in the simulated panels (bias ${fmt(b)} +- ${fmt(e)}).`,
          );
        }
        const c = q.coverage.value;
        const ce = q.coverage.mcError;
        if (c !== null && ce !== null && c + 3 * Math.max(ce, 0.01) < 0.95) {
          cautions.push(`${q.label}: the 95% intervals covered the simulated value in only ${Math.round(c * 100)}% of re-fits.`);
        }
      }
      groups.push({
        source: s,
        target: t,
        title: groupTitle(models, s, t),
        refits: mine.length,
        converged: converged.length,
        failed: failedCount,
        convergedShare: share,
        parameters,
        correlations,
        cautions,
      });
    }
  }
  return groups;
}
