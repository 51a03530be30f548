/**
 * Pre-fit checks: find, before any simulation, the data situations in which a parameter cannot be
 * estimated, and say so in plain words.
 *
 * Purpose: refuse a period whose rate cannot be estimated (no change at all), targets at their bounds
 * (no mutual dyads with reciprocity estimated, and the like), and warn about very large change.
 *
 * References:
 * - Snijders, T.A.B. (2001). The statistical evaluation of social network dynamics. Sociological
 *   Methodology 31, 361-395. (moment equations; their solution runs off to infinity when an observed
 *   statistic is at the edge of its range)
 * - Snijders, T.A.B., van de Bunt, G.G. & Steglich, C.E.G. (2010). Introduction to stochastic
 *   actor-based models for network dynamics. Social Networks 32, 44-60. (the Jaccard index between
 *   waves as a data diagnostic; below about 0.2 is problematic, from memory)
 * - Wavefit METHODS.md pitfalls 8.5 and 8.6.
 */
import type { ParameterPlan, PeriodInput } from './problem';
import { freePairMask } from '../simulate';
import { NetworkState } from '../state';
import { JACCARD_CAUTION, waveChange } from '../waveChange';

export interface FitProblemNote {
  /** 'error' blocks a fit; 'warning' is shown but allowed. */
  severity: 'error' | 'warning';
  code: 'zero_change' | 'at_bound' | 'large_change' | 'low_jaccard' | 'no_density';
  /** Where it belongs in the model form: "rates.0", "effects.2". */
  path: string;
  message: string;
}

function sumStat(periods: PeriodInput[], k: number): number {
  let s = 0;
  for (const per of periods) {
    const n = Math.round(Math.sqrt(per.end.length));
    s += per.effects[k].statistic(NetworkState.fromAdjacency(n, per.end));
  }
  return s;
}

/**
 * Checks a model against its data.
 * @param periodLabels names of the periods for the messages ("wave 1 to wave 2")
 */
export function checkModelData(
  periods: PeriodInput[],
  rates: ParameterPlan[],
  params: ParameterPlan[],
  periodLabels: string[] = periods.map((_, m) => `period ${m + 1}`),
): FitProblemNote[] {
  const notes: FitProblemNote[] = [];
  if (periods.length === 0) return notes;
  const effects = periods[0].effects;
  if (!effects.some((e) => e.id === 'density')) {
    notes.push({
      severity: 'error',
      code: 'no_density',
      path: 'effects',
      message: 'A model needs at least the density effect; add it (it sets how many ties people keep).',
    });
  }
  let totalTies = 0;
  let totalFree = 0;
  periods.forEach((per, m) => {
    const n = Math.round(Math.sqrt(per.end.length));
    const { pairs: free, stable: both, created, dissolved } = waveChange(n, per.start, per.end, {
      mask: freePairMask(n, per.free, per.active),
    });
    const change = created + dissolved;
    const either = both + created + dissolved;
    const ties = both + created;
    totalTies += ties;
    totalFree += free;
    const label = periodLabels[m];
    if (change === 0 && rates[m]?.estimate) {
      notes.push({
        severity: 'error',
        code: 'zero_change',
        path: `rates.${m}`,
        message:
          `No tie changes between ${label}, so its rate cannot be estimated (it would fall to zero). ` +
          'Fix this rate at a small value or leave the period out of the model.',
      });
    } else if (free > 0 && (2 * change) / free >= 0.95) {
      notes.push({
        severity: 'warning',
        code: 'large_change',
        path: `rates.${m}`,
        message: `${change} of ${free} pairs change between ${label}; the model assumes gradual change, so the rate may not be estimable.`,
      });
    } else if (either > 0 && both / either < JACCARD_CAUTION) {
      notes.push({
        severity: 'warning',
        code: 'low_jaccard',
        path: `rates.${m}`,
        message:
          `Only ${((100 * both) / either).toFixed(0)}% of the ties present in either wave are present in both (${label}); ` +
          `below about ${100 * JACCARD_CAUTION}% the gradual-change assumption is doubtful.`,
      });
    }
  });

  const bound = (k: number, message: string) =>
    notes.push({ severity: 'error', code: 'at_bound', path: `effects.${k}`, message });
  const fixHint = 'Fix its parameter or drop the effect.';
  effects.forEach((e, k) => {
    if (!params[k]?.estimate) return;
    switch (e.id) {
      case 'density':
        if (totalTies === 0) bound(k, `There are no ties at all in the end waves, so the density parameter would run to minus infinity. ${fixHint}`);
        else if (totalTies === totalFree) bound(k, `Every possible tie is present in the end waves, so the density parameter would run to infinity. ${fixHint}`);
        break;
      case 'reciprocity': {
        const mutual = sumStat(periods, k);
        if (mutual === 0 && totalTies > 0) bound(k, `No tie is returned in any end wave (no mutual dyads), so the reciprocity parameter would run to minus infinity. ${fixHint}`);
        else if (mutual === totalTies && totalTies > 0) bound(k, `Every tie is returned in the end waves, so the reciprocity parameter would run to infinity. ${fixHint}`);
        break;
      }
      case 'transitive_triplets':
      case 'three_cycles':
      case 'transitive_ties':
        if (sumStat(periods, k) === 0 && totalTies > 0) {
          bound(k, `The end waves contain no ${e.id === 'three_cycles' ? 'closed three-cycles' : 'transitive closures'} at all, so the ${e.label} parameter would run to minus infinity. ${fixHint}`);
        }
        break;
      case 'same_covariate': {
        const same = sumStat(periods, k);
        if (same === 0 && totalTies > 0) bound(k, `No tie in the end waves joins two people of the same category, so the ${e.label} parameter would run to minus infinity. ${fixHint}`);
        else if (same === totalTies && totalTies > 0) bound(k, `Every tie in the end waves joins two people of the same category, so the ${e.label} parameter would run to infinity. ${fixHint}`);
        break;
      }
      default:
        break;
    }
  });
  return notes;
}
