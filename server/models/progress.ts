/**
 * Fit progress as job work units: the queue knows one number per job (units done), so a fit lays its
 * phases out on one line, each stage with a fixed offset and a weight per run, and the API decodes
 * the number back into phase, sub-phase and iteration. Phases 1 and 3 weigh p + 1 simulations per run
 * (finite differences), Phase 2 one per iteration; a sub-phase that ends early jumps to the next offset.
 */
import type { FitProgress } from '../../shared/models';
import { DEFAULT_PHASE3_DERIVATIVE_RUNS, DEFAULT_ROUND_BUDGET, subphaseRule } from '../engine/estimate';

/** Phase 2 iterations allowed beyond a sub-phase's minimum (METHODS.md 4.3). */
export const SUBPHASE_EXTRA = 200;
export const SUBPHASES = 4;

export interface FitStage {
  phase: 1 | 2 | 3;
  subphase: number;
  runs: number;
  weight: number;
  offset: number;
}

export interface FitWorkPlan {
  p: number;
  phase1Runs: number;
  stages: FitStage[];
  total: number;
}

/** Phase 1 runs by default: 10 + 3p (METHODS.md 4.3, our choice). */
export function defaultPhase1Runs(p: number): number {
  return 10 + 3 * p;
}

/** Minimum length of Phase 2 sub-phase k: 2^(4(k-1)/3) (7 + p) (METHODS.md 4.3, Snijders 2001). */
export function subphaseMinimum(k: number, p: number): number {
  return subphaseRule(k, p).minLength;
}

/** Rounds a product fit may take: the first and up to two continuations from its estimates. */
export const FIT_ROUND_BUDGET = DEFAULT_ROUND_BUDGET;

export function fitWorkPlan(p: number, phase3Runs: number, skipPhase1: boolean): FitWorkPlan {
  if (!Number.isInteger(p) || p < 1) throw new Error(`fit: the number of estimated parameters must be at least 1, got ${String(p)}`);
  const phase1Runs = skipPhase1 ? 0 : defaultPhase1Runs(p);
  const stages: FitStage[] = [];
  let offset = 0;
  const push = (phase: 1 | 2 | 3, subphase: number, runs: number, weight: number) => {
    stages.push({ phase, subphase, runs, weight, offset });
    offset += runs * weight;
  };
  if (phase1Runs > 0) push(1, 0, phase1Runs, p + 1);
  for (let k = 1; k <= SUBPHASES; k++) push(2, k, subphaseMinimum(k, p) + SUBPHASE_EXTRA, 1);
  // Phase 3 of round 1 (sub-phase 0) and of each possible continuation round r (sub-phase r): every run
  // is one simulation, and the first ones p more for the derivatives (counted as one weight per run).
  const derivativeRuns = Math.min(phase3Runs, DEFAULT_PHASE3_DERIVATIVE_RUNS);
  const weight = Math.max(1, Math.round((phase3Runs + p * derivativeRuns) / phase3Runs));
  for (let r = 1; r <= FIT_ROUND_BUDGET; r++) push(3, r === 1 ? 0 : r, phase3Runs, weight);
  return { p, phase1Runs, stages, total: offset };
}

export function stageOf(plan: FitWorkPlan, phase: number, subphase: number): FitStage {
  const stage = plan.stages.find((s) => s.phase === phase && s.subphase === subphase);
  if (!stage) throw new Error(`fit: no stage for phase ${phase}, sub-phase ${subphase}`);
  return stage;
}

/** Units done after `iteration` runs of a stage. */
export function unitsAt(plan: FitWorkPlan, phase: number, subphase: number, iteration: number): number {
  const stage = stageOf(plan, phase, subphase);
  return stage.offset + Math.min(iteration, stage.runs) * stage.weight;
}

/** Decodes units done into phase, sub-phase and iteration; phase 0 before anything ran. */
export function decodeProgress(plan: FitWorkPlan, unitsDone: number): FitProgress {
  const fraction = plan.total > 0 ? Math.min(1, Math.max(0, unitsDone / plan.total)) : 0;
  if (!(unitsDone > 0)) return { phase: 0, subphase: 0, iteration: 0, planned: 0, fraction: 0 };
  let current = plan.stages[0];
  for (const s of plan.stages) if (unitsDone >= s.offset) current = s;
  const iteration = Math.min(current.runs, Math.floor((unitsDone - current.offset) / current.weight + 1e-9));
  return { phase: current.phase, subphase: current.subphase, iteration, planned: current.runs, fraction };
}
