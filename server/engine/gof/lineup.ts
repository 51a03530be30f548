/**
 * Lineup test: the plan of a seeded lineup (which panel shows the observed wave, which simulated chain
 * fills each other panel) and the lineup p-value of K independent reviewers of whom x picked the
 * observed panel.
 *
 * Purpose: a visual test. If the model is right the observed panel is one of m exchangeable panels, so
 * each independent reviewer finds it with probability 1/m; x or more correct picks out of K has
 * probability P(Binomial(K, 1/m) >= x).
 *
 * References:
 * - Buja, A., Cook, D., Hofmann, H., Lawrence, M., Lee, E.-K., Swayne, D.F. & Wickham, H. (2009).
 *   Statistical inference for exploratory data analysis and model diagnostics.
 *   Philosophical Transactions of the Royal Society A 367, 4361-4383. (the lineup protocol)
 * - Majumder, M., Hofmann, H. & Cook, D. (2013). Validation of visual statistical inference, applied to
 *   linear models. Journal of the American Statistical Association 108, 942-956. (the binomial p-value
 *   for K independent observers, and its caution for few observers)
 */
import { createRng } from '../prng';

export const DEFAULT_LINEUP_PANELS = 20;

export interface LineupPlan {
  /** Number of panels m. */
  panels: number;
  /** The observed wave's panel, from 0. */
  observedPanel: number;
  /** Per panel the simulated chain shown there (from 0), or -1 for the observed panel. */
  chainOfPanel: number[];
}

/**
 * The plan of a lineup: the observed position uniform over the m panels, and m - 1 distinct simulated
 * chains drawn without replacement from the batch's N chains (partial Fisher-Yates shuffle), all from
 * one seeded stream so the same seed always gives the same lineup.
 */
export function lineupPlan(seed: number, panels: number, chains: number): LineupPlan {
  if (!Number.isInteger(panels) || panels < 2) throw new Error(`lineup: a lineup needs at least 2 panels, got ${panels}`);
  if (!Number.isInteger(chains) || chains < panels - 1) {
    throw new Error(`lineup: ${panels} panels need at least ${panels - 1} simulated chains, the batch has ${chains}`);
  }
  const rng = createRng(seed);
  const observedPanel = rng.nextInt(panels);
  const pool = Int32Array.from({ length: chains }, (_, k) => k);
  const picked: number[] = [];
  for (let k = 0; k < panels - 1; k++) {
    const j = k + rng.nextInt(chains - k);
    const tmp = pool[k];
    pool[k] = pool[j];
    pool[j] = tmp;
    picked.push(pool[k]);
  }
  const chainOfPanel: number[] = [];
  let at = 0;
  for (let p = 0; p < panels; p++) chainOfPanel.push(p === observedPanel ? -1 : picked[at++]);
  return { panels, observedPanel, chainOfPanel };
}

/** P(Binomial(K, 1/m) >= x): the chance of x or more correct picks among K reviewers guessing at random. */
export function lineupPValue(reviewers: number, correct: number, panels: number): number {
  if (!Number.isInteger(reviewers) || reviewers < 0) throw new Error(`lineup: the number of reviewers must be a whole number >= 0, got ${reviewers}`);
  if (!Number.isInteger(correct) || correct < 0 || correct > reviewers) throw new Error(`lineup: correct picks must be between 0 and ${reviewers}, got ${correct}`);
  if (!Number.isInteger(panels) || panels < 2) throw new Error(`lineup: a lineup needs at least 2 panels, got ${panels}`);
  if (correct === 0) return 1;
  const p = 1 / panels;
  // Terms from k = correct upwards, each from the one before (no subtraction, so tiny tails keep their digits).
  let logTerm = logChoose(reviewers, correct) + correct * Math.log(p) + (reviewers - correct) * Math.log1p(-p);
  let term = Math.exp(logTerm);
  let sum = term;
  for (let k = correct; k < reviewers; k++) {
    term *= ((reviewers - k) / (k + 1)) * (p / (1 - p));
    sum += term;
  }
  return Math.min(1, sum);
}

function logChoose(n: number, k: number): number {
  let s = 0;
  for (let j = 1; j <= k; j++) s += Math.log(n - k + j) - Math.log(j);
  return s;
}

/** The smallest p-value K reviewers can reach on an m-panel lineup: all K correct, (1/m)^K. */
export function lineupFloor(reviewers: number, panels: number): number {
  return Math.pow(1 / panels, reviewers);
}

/** Fewer independent reviewers than this get a caution (Majumder et al. 2013 used far more observers). */
export const FEW_REVIEWERS = 5;
