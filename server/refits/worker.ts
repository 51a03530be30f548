/**
 * Re-fit worker: one chunk is one re-fit. It simulates replication r of the source model's panel
 * (from the observed start wave of the first covered period, each later period starting from the
 * simulated end of the one before, with the source fit's values and the engine's simulator; fixed
 * pairs and absent actors of the observed data stay so in the panels), then
 * fits the target model to it with the estimator's public entry (fitSaom), starting from the target
 * fit's own values and, when it has one, its Phase 3 derivative matrix (as "continue from a fit" does).
 *
 * Streams: the panel of (source s, replication r) period p uses deriveSeed(seed, 1, s, r, p), so every
 * target sees the same panel; the estimation uses deriveSeed(seed, 2, s, r, t). Results do not depend
 * on chunk order, the number of workers or restarts.
 *
 * References: Snijders (2001) The statistical evaluation of social network dynamics, Sociological
 * Methodology 31 (the estimator); METHODS.md sections 3 (simulation from a start wave) and 4.
 */
import { buildEffects } from '../engine/effects';
import { fitSaom } from '../engine/estimate';
import { deriveSeed, createRng } from '../engine/prng';
import { simulatePeriod } from '../engine/simulate';
import { NetworkState } from '../engine/state';
import type { ChunkContext } from '../jobs/registry';
import { effectKey, effectSpecs, paramPlans, periodInputs, ratePlans, rateKey, sortedRates, type FitPeriodData } from '../models/modelData';
import { FIT_ROUND_BUDGET } from '../models/progress';
import { resultsFromFit } from '../models/results';
import type { RefitChunk, RefitChunkResult, RefitContext } from './context';

/** The panel simulated from model `source`, replication `replication`: one FitPeriodData per covered period. */
export function simulatePanel(context: RefitContext, source: number, replication: number): FitPeriodData[] {
  const model = context.models[source];
  const value = (key: string) => model.info.values[model.info.keys.indexOf(key)];
  const specs = effectSpecs(model.spec);
  const params = model.spec.effects.map((e) => value(effectKey(e)));
  const out: FitPeriodData[] = [];
  let previous: { period: number; end: NetworkState } | null = null;
  for (const per of context.periods) {
    const start =
      previous && previous.period === per.period - 1 ? previous.end : NetworkState.fromAdjacency(context.n, per.start);
    const effects = buildEffects(specs, per.covariates, per.centring);
    const rate = value(rateKey(per.period));
    if (!(rate > 0)) throw new Error(`refit: model ${source + 1} has no positive rate for period ${per.period}`);
    const rng = createRng(deriveSeed(context.seed, 1, source, replication, per.period));
    const { end } = simulatePeriod({ start, rate, effects, params, rng, ...(per.free ? { free: per.free } : {}), ...(per.active ? { active: per.active } : {}) });
    out.push({ ...per, start: Uint8Array.from(start.adj), end: Uint8Array.from(end.adj), endMissing: null });
    previous = { period: per.period, end };
  }
  return out;
}

/** Re-fits model `target` to the panel of (source, replication). An estimation that fails is a result, not an error. */
export function runRefit(context: RefitContext, chunk: RefitChunk, ctx?: ChunkContext): RefitChunkResult {
  const started = performance.now();
  const panel = simulatePanel(context, chunk.source, chunk.replication);
  const target = context.models[chunk.target];
  const { spec, info } = target;
  const value = (key: string) => info.values[info.keys.indexOf(key)];
  const rates = ratePlans(spec).map((plan, m) => {
    const v = value(rateKey(sortedRates(spec)[m].period));
    return plan.estimate && v > 0 ? { estimate: true, value: v } : plan;
  });
  const params = paramPlans(spec).map((plan, k) => {
    const v = value(effectKey(spec.effects[k]));
    return plan.estimate && Number.isFinite(v) ? { estimate: true, value: v } : plan;
  });
  const seed = deriveSeed(context.seed, 2, chunk.source, chunk.replication, chunk.target);
  const p = rates.filter((r) => r.estimate).length + params.filter((q) => q.estimate).length;
  const derivative = target.derivative && target.derivative.length === p ? target.derivative : null;
  const empty = { estimates: new Float64Array(0), ses: new Float64Array(0) };
  try {
    const fit = fitSaom(
      { n: context.n, periods: periodInputs(panel, spec), rates, params, seed },
      // The same automatic continuation as a fit, with the fit's own round budget (seeded, so a re-fit
      // rerun after a restart gives the identical result).
      { phase3Runs: context.phase3Runs, maxRounds: FIT_ROUND_BUDGET, ...(derivative ? { initialDerivative: derivative } : {}) },
    );
    const seconds = (performance.now() - started) / 1000;
    const results = resultsFromFit(spec, fit, seconds);
    const byKey = new Map(results.parameters.map((q) => [q.key, q]));
    const estimates = Float64Array.from(info.keys, (k) => byKey.get(k)?.value ?? Number.NaN);
    const ses = Float64Array.from(info.keys, (k) => byKey.get(k)?.se ?? Number.NaN);
    return { finished: true, converged: results.converged, maxAbsT: results.maxAbsT, tauMax: results.tauMax, estimates, ses, seconds, error: null };
  } catch (error) {
    const message = (error as Error).message.replace(/^estimate: /, '');
    ctx?.log(`Re-fit of model ${chunk.target + 1} to panel ${chunk.replication + 1} of model ${chunk.source + 1} failed: ${message}`);
    return { finished: false, converged: false, maxAbsT: null, tauMax: null, ...empty, seconds: (performance.now() - started) / 1000, error: message };
  }
}

/** The queue's entry point. */
export function runChunk(context: RefitContext, chunk: RefitChunk, ctx: ChunkContext): RefitChunkResult {
  const result = runRefit(context, chunk, ctx);
  ctx.progress(1);
  return result;
}
