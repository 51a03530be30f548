/**
 * Score-type tests of candidate effects for a finished fit (server/models/scoreTests.ts):
 *   GET /studies/:studyId/models/:modelId/fits/:fitId/score-tests -> ScoreTestsResponse
 * Source: Schweinberger (2012), British Journal of Mathematical and Statistical Psychology 65:263-281.
 */
import type { EffectId } from './effects';
import type { ModelSpecBody } from './models';

export interface CandidateScoreTest {
  /** "transitive_triplets" or "covariate_ego:age". */
  key: string;
  effectId: EffectId;
  covariate: string | null;
  label: string;
  /** Score-type statistic, chi-square with 1 df under "the parameter is 0". */
  statistic: number;
  pValue: number;
  /** One-step estimate of the parameter if the effect were added. */
  oneStep: number;
  /** In plain words. */
  sentence: string;
  /** The model with this effect added (estimated, starting at the one-step value), ready to save. */
  extendedModel: ModelSpecBody;
}

export interface ScoreTestsResponse {
  fitId: number;
  /** Simulations at the estimates used for every test. */
  runs: number;
  seed: number;
  /** Ranked: smallest p-value first. */
  candidates: CandidateScoreTest[];
  /** Effects of the catalogue that could not be tested here, with why. */
  skipped: { label: string; reason: string }[];
  caution: string | null;
}

export function scoreTestSentence(label: string, pValue: number, oneStep: number): string {
  const p = pValue < 0.001 ? pValue.toExponential(1) : pValue.toFixed(3);
  const est = oneStep.toFixed(2);
  if (pValue < 0.05) return `Adding ${label.toLowerCase()} would likely improve the fit (p = ${p}, expected parameter ${est}).`;
  if (pValue < 0.1) return `Adding ${label.toLowerCase()} might improve the fit a little (p = ${p}, expected parameter ${est}).`;
  return `No sign that ${label.toLowerCase()} is missing (p = ${p}).`;
}
