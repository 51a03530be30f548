/**
 * Descriptive summaries of uploaded waves: ties, density, reciprocity index, missing pairs, and the
 * change between consecutive waves (Hamming distance, Jaccard index).
 *
 * References: Wasserman & Faust (1994) Social Network Analysis, ch. 4 (density) and ch. 13
 * (reciprocity, dyad census: reciprocity index 2M/L); Jaccard (1912) The distribution of the flora
 * in the alpine zone, New Phytologist 11; Snijders, van de Bunt & Steglich (2010) Introduction to
 * stochastic actor-based models for network dynamics, Social Networks 32 (Jaccard index between
 * consecutive waves as a data diagnostic, below about 0.2 problematic; from memory).
 */
import {
  JACCARD_CAUTION,
  type CategoricalSummary,
  type CovariateInfo,
  type CovariateSummary,
  type NumericSummary,
  type WaveChange,
  type WaveSummary,
} from '../../shared/data';
import { waveChange } from '../engine/waveChange';
import { TIE_MISSING, TIE_PRESENT, type ParsedCovariate } from './parse';

/** Summary of one wave (n actors, row-major n*n codes 0/1/2). Missing pairs are left out of every ratio. */
export function summarizeWave(index: number, label: string, n: number, adjacency: Uint8Array): WaveSummary {
  if (adjacency.length !== n * n) throw new Error(`summaries: wave ${index} has ${adjacency.length} cells for ${n} actors`);
  let ties = 0;
  let missing = 0;
  let mutual = 0; // mutual dyads, i < j
  let tiesWithObservedReverse = 0;
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      if (i === j) continue;
      const v = adjacency[i * n + j];
      if (v === TIE_MISSING) {
        missing++;
        continue;
      }
      if (v !== TIE_PRESENT) continue;
      ties++;
      const back = adjacency[j * n + i];
      if (back === TIE_MISSING) continue;
      tiesWithObservedReverse++;
      if (back === TIE_PRESENT && i < j) mutual++;
    }
  }
  const observedPairs = n * (n - 1) - missing;
  return {
    index,
    label,
    actors: n,
    ties,
    density: observedPairs > 0 ? ties / observedPairs : 0,
    reciprocity: tiesWithObservedReverse > 0 ? (2 * mutual) / tiesWithObservedReverse : null,
    missing,
  };
}

/** Change from wave `from` to wave `to` over the pairs observed in both. */
export function compareWaves(from: number, to: number, n: number, a: Uint8Array, b: Uint8Array): WaveChange {
  const { stable, created, dissolved, jaccard } = waveChange(n, a, b, { missing: TIE_MISSING });
  let caution: string | null = null;
  if (created + dissolved === 0) {
    caution = `No tie changed between wave ${from} and wave ${to}: this period carries no information about change, and its rate cannot be estimated.`;
  } else if (jaccard !== null && jaccard < JACCARD_CAUTION) {
    caution =
      `Few ties last from wave ${from} to wave ${to} (Jaccard index ${jaccard.toFixed(2)}, below ${JACCARD_CAUTION}). ` +
      'The model assumes change happens gradually, in many small steps; with this much turnover its estimates may be unreliable.';
  }
  return { from, to, created, dissolved, stable, hamming: created + dissolved, jaccard, caution };
}

function summarizeColumn(cov: ParsedCovariate, column: (number | string | null)[], wave: number | null): CovariateSummary {
  const observed = column.filter((v): v is number | string => v !== null);
  const missing = column.length - observed.length;
  if (cov.kind === 'numeric') {
    const nums = observed as number[];
    const summary: NumericSummary = {
      kind: 'numeric',
      wave,
      observed: nums.length,
      missing,
      min: nums.length ? Math.min(...nums) : null,
      max: nums.length ? Math.max(...nums) : null,
      mean: nums.length ? nums.reduce((s, v) => s + v, 0) / nums.length : null,
    };
    return summary;
  }
  const counts: Record<string, number> = {};
  for (const c of cov.categories) counts[c] = 0;
  for (const v of observed) counts[String(v)] = (counts[String(v)] ?? 0) + 1;
  const summary: CategoricalSummary = { kind: 'categorical', wave, observed: observed.length, missing, counts };
  return summary;
}

export function summarizeCovariate(cov: ParsedCovariate): CovariateInfo {
  return {
    name: cov.name,
    kind: cov.kind,
    changing: cov.changing,
    categories: cov.categories,
    summaries: cov.values.map((column, k) => summarizeColumn(cov, column, cov.changing ? k + 1 : null)),
  };
}
