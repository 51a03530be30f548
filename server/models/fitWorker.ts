/**
 * Fit worker: runs one method-of-moments estimation in a worker thread of the job queue and returns
 * the results (pure computation, no database). Progress goes out as work units (./progress.ts),
 * notable events as log lines.
 *
 * References: Snijders (2001) The statistical evaluation of social network dynamics, Sociological
 * Methodology 31 (the estimator); METHODS.md section 4.
 */
import type { ChunkContext } from '../jobs/registry';
import { fitSaom } from '../engine/estimate';
import type { FitResults } from '../../shared/models';
import { paramPlans, periodInputs, ratePlans, effectKey, rateKey, sortedRates } from './modelData';
import { FIT_ROUND_BUDGET, fitWorkPlan, SUBPHASE_EXTRA, unitsAt } from './progress';
import { resultsFromFit } from './results';
import type { FitContext } from './context';

export function runFit(context: FitContext, ctx: ChunkContext): FitResults {
  const started = performance.now();
  const { spec } = context;
  const inputs = periodInputs(context.periods, spec);
  const rates = ratePlans(spec);
  const params = paramPlans(spec);
  // Starting values carried over from an earlier fit, by key.
  sortedRates(spec).forEach((r, m) => {
    const v = context.startValues[rateKey(r.period)];
    if (rates[m].estimate && v !== undefined && v > 0) rates[m] = { estimate: true, value: v };
  });
  spec.effects.forEach((e, k) => {
    const v = context.startValues[effectKey(e)];
    if (params[k].estimate && v !== undefined) params[k] = { estimate: true, value: v };
  });
  const p = rates.filter((r) => r.estimate).length + params.filter((q) => q.estimate).length;
  const plan = fitWorkPlan(p, context.phase3Runs, context.initialDerivative !== null);
  let lastSent = 0;
  const fit = fitSaom(
    { n: context.n, periods: inputs, rates, params, seed: context.seed },
    {
      phase1Runs: plan.phase1Runs > 0 ? plan.phase1Runs : undefined,
      subphaseExtra: SUBPHASE_EXTRA,
      phase3Runs: context.phase3Runs,
      maxRounds: FIT_ROUND_BUDGET,
      ...(context.initialDerivative ? { initialDerivative: context.initialDerivative } : {}),
      log: (line) => ctx.log(line),
      onProgress: (pr) => {
        const now = performance.now();
        const stageEnd = pr.iteration >= pr.planned;
        if (now - lastSent < 150 && !stageEnd && pr.iteration > 1) return;
        lastSent = now;
        ctx.progress(unitsAt(plan, pr.phase, pr.subphase, pr.iteration));
      },
    },
  );
  const seconds = (performance.now() - started) / 1000;
  ctx.log(`Estimation finished in ${seconds.toFixed(1)} s after ${fit.simulatedPeriods} simulated periods.`);
  return resultsFromFit(spec, fit, seconds, FIT_ROUND_BUDGET);
}

/** The queue's entry point: one chunk is the whole fit. */
export function runChunk(context: FitContext, _chunk: Record<string, never>, ctx: ChunkContext): FitResults {
  return runFit(context, ctx);
}
