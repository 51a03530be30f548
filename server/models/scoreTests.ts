/**
 * Score-type tests of the catalogue effects a finished fit leaves out: every effect (and every
 * covariate of the right kind for covariate effects) not in the model is added with its parameter
 * fixed at 0, the model is simulated at the fit's values (a short seeded Phase-3-like set, since a fit
 * does not keep its Phase-3 simulations), and each candidate gets the generalised score-type test and
 * its one-step estimate (server/engine/estimate/scoreTest.ts; Schweinberger 2012).
 *
 * The computation runs in the request (a few seconds on study-sized data) and is cached per fit and
 * app; a finished fit never changes.
 */
import type { DataSource } from 'typeorm';
import { EFFECT_CATALOGUE, type EffectId } from '../../shared/effects';
import type { EffectSpecInput, FitResults } from '../../shared/models';
import { scoreTestSentence, type CandidateScoreTest, type ScoreTestsResponse } from '../../shared/scoreTests';
import { candidateScoreTests, checkModelData } from '../engine/estimate';
import { deriveSeed } from '../engine/prng';
import { conflict } from '../errors';
import { effectKey, fitPeriods, periodInputs, sortedRates, type StoredSpec } from './modelData';
import { studyData, type FitRowDb, type ModelRow } from './rows';

export const SCORE_TEST_RUNS = 100;
const SCORE_STREAM = 0x5c07;

const cache = new Map<number, ScoreTestsResponse>();

function candidatesFor(spec: StoredSpec, covariates: Record<string, { kind: string }>): EffectSpecInput[] {
  const inModel = new Set(spec.effects.map((e) => effectKey(e)));
  const out: EffectSpecInput[] = [];
  for (const info of EFFECT_CATALOGUE) {
    if (info.covariate === 'none') {
      if (!inModel.has(info.id)) out.push({ id: info.id, estimate: false, value: 0 });
      continue;
    }
    for (const [name, c] of Object.entries(covariates)) {
      if (c.kind !== info.covariate) continue;
      if (!inModel.has(`${info.id}:${name}`)) out.push({ id: info.id, covariate: name, estimate: false, value: 0 });
    }
  }
  return out;
}

function labelOf(e: { id: string; covariate?: string }): string {
  const info = EFFECT_CATALOGUE.find((x) => x.id === e.id)!;
  return e.covariate ? `${info.label} (${e.covariate})` : info.label;
}

export async function scoreTestsOf(dataSource: DataSource, model: ModelRow, row: FitRowDb, runs = SCORE_TEST_RUNS): Promise<ScoreTestsResponse> {
  const hit = cache.get(row.id);
  if (hit && hit.runs === runs) return hit;
  if (row.state !== 'done' || !row.results) throw conflict('fit_not_running', 'Score-type tests need a finished fit with estimates.');
  const results = JSON.parse(row.results) as FitResults;
  const spec = JSON.parse(row.spec) as StoredSpec;
  const data = await studyData(dataSource, row.studyId);
  const periods = fitPeriods(data, spec);
  const values = new Map(results.parameters.map((p) => [p.key, p.value]));
  const all = candidatesFor(spec, data.covariates);
  const rates = sortedRates(spec).map((r) => ({ estimate: r.estimate, value: values.get(`rate:${r.period}`)! }));
  const modelParams = spec.effects.map((e) => ({ estimate: e.estimate, value: values.get(effectKey(e)) ?? 0 }));

  // Leave out candidates the data cannot inform (a statistic at its bound, a covariate without spread).
  const skipped: { label: string; reason: string }[] = [];
  const usable: EffectSpecInput[] = [];
  for (const c of all) {
    let inputs;
    try {
      inputs = periodInputs(periods, { rates: spec.rates, effects: [...spec.effects, c] });
    } catch (e) {
      skipped.push({ label: labelOf(c), reason: e instanceof Error ? e.message.replace(/^effects: /, '') : String(e) });
      continue;
    }
    const notes = checkModelData(inputs, rates, [...modelParams, { estimate: true, value: 0 }]).filter(
      (n) => n.severity === 'error' && n.path === `effects.${spec.effects.length}`,
    );
    if (notes.length) skipped.push({ label: labelOf(c), reason: notes[0].message });
    else usable.push(c);
  }
  const seed = deriveSeed(row.seed, SCORE_STREAM) % 2147483647;
  const extended: StoredSpec = { rates: spec.rates, effects: [...spec.effects, ...usable] };
  const tested = usable.length
    ? candidateScoreTests(
        {
          n: data.actors.length,
          periods: periodInputs(periods, extended),
          rates,
          params: [...modelParams, ...usable.map(() => ({ estimate: true, value: 0 }))],
          seed,
        },
        usable.length,
        runs,
      )
    : { results: [] };
  const candidates: CandidateScoreTest[] = tested.results.map((r, k) => {
    const c = usable[k];
    const label = labelOf(c);
    const oneStep = Number.isFinite(r.oneStep) ? r.oneStep : 0;
    return {
      key: effectKey(c),
      effectId: c.id as EffectId,
      covariate: c.covariate ?? null,
      label,
      statistic: r.statistic,
      pValue: r.pValue,
      oneStep,
      sentence: scoreTestSentence(label, r.pValue, oneStep),
      extendedModel: {
        name: `${model.name} + ${label}`.slice(0, 120),
        description: `${model.name} with ${label.toLowerCase()} added, suggested by a score-type test of fit ${row.id} (p = ${r.pValue.toPrecision(2)}).`,
        rates: spec.rates.map((rt) => ({ ...rt, ...(rt.estimate ? { value: values.get(`rate:${rt.period}`) } : {}) })),
        effects: [
          ...spec.effects.map((e) => ({ ...e, ...(e.estimate ? { value: values.get(effectKey(e)) } : {}) })),
          { id: c.id, ...(c.covariate ? { covariate: c.covariate } : {}), estimate: true, value: Math.max(-5, Math.min(5, oneStep)) },
        ],
      } as CandidateScoreTest['extendedModel'],
    };
  });
  candidates.sort((a, b) => a.pValue - b.pValue);
  const cautions: string[] = [];
  if (row.mode === 'fixed') {
    cautions.push('These values were entered by hand, not estimated: the tests take them as given and do not allow for estimating the other parameters, so they find more to add than they would after a fit.');
  } else if (!results.converged) cautions.push('The fit did not converge, so the tests are taken at values that are not the estimates; read them as rough hints and continue the fit first.');
  cautions.push(
    `Each test uses ${runs} simulations at the estimates; p-values near 0.05 can move with another seed. Each candidate is tested on its own: two small p-values do not mean both effects are needed together.`,
  );
  const response: ScoreTestsResponse = { fitId: row.id, runs, seed, candidates, skipped, caution: cautions.join(' ') };
  cache.set(row.id, response);
  return response;
}
