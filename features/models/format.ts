/** Display helpers for models and fits: states in words, estimates with fixed decimals, convergence readings. */
import type { BadgeTone } from '../ui/Badge';
import type { IconName } from '../ui/icons';
import { CONVERGENCE_T_LIMIT, HIGH_CORRELATION, TAU_MAX_LIMIT, type FitProgress, type FitState } from '../../shared/models';

export const fitStateWords: Record<FitState, { label: string; tone: BadgeTone; icon: IconName }> = {
  queued: { label: 'Waiting', tone: 'neutral', icon: 'info' },
  running: { label: 'Estimating', tone: 'accent', icon: 'info' },
  done: { label: 'Done', tone: 'pass', icon: 'pass' },
  failed: { label: 'Failed', tone: 'fail', icon: 'error' },
  cancelled: { label: 'Cancelled', tone: 'unsure', icon: 'caution' },
};

/** A number with a true minus sign and fixed decimals; an em dash for nothing. */
export function fixed(x: number | null | undefined, digits = 3): string {
  if (x == null || !Number.isFinite(x)) return '—';
  const s = Math.abs(x) >= 1e5 ? Math.abs(x).toExponential(2) : Math.abs(x).toFixed(digits);
  return (x < 0 && Number(s) !== 0 ? '\u2212' : '') + s;
}

export function convergenceWord(converged: boolean | null): { label: string; tone: BadgeTone; icon: IconName } | null {
  if (converged == null) return null;
  return converged
    ? { label: 'Converged', tone: 'pass', icon: 'pass' }
    : { label: 'Not converged', tone: 'unsure', icon: 'caution' };
}

/** Whether a convergence t-ratio is beyond the common-practice limit. */
export function tHigh(t: number | null): boolean {
  return t == null || Math.abs(t) >= CONVERGENCE_T_LIMIT;
}

export function tauHigh(tau: number | null): boolean {
  return tau == null || tau >= TAU_MAX_LIMIT;
}

export function highCorrelation(r: number | null): boolean {
  return r != null && Math.abs(r) > HIGH_CORRELATION;
}

const PHASE_NAMES = ['Waiting for a worker', 'Phase 1 of 3: derivatives at the starting values', 'Phase 2 of 3: stochastic approximation', 'Phase 3 of 3: standard errors and convergence check'];

/** The progress in words: phase, sub-phase and iteration. */
export function progressWords(p: FitProgress): string {
  if (p.phase === 0) return PHASE_NAMES[0];
  const head = PHASE_NAMES[p.phase];
  if (p.phase === 2) return `${head} · sub-phase ${p.subphase} of 4 · iteration ${p.iteration} (at most ${p.planned})`;
  if (p.phase === 3 && p.subphase > 1) return `${head} · continuing from the estimates, round ${p.subphase} · run ${p.iteration} of ${p.planned}`;
  return `${head} · run ${p.iteration} of ${p.planned}`;
}

/** How many rounds a fit took, in words (each round ends with a Phase 3 convergence check). */
export function roundsWords(rounds: number, budget: number | null, converged: boolean): string {
  const took = rounds === 1 ? 'This fit took 1 round' : `This fit took ${rounds} rounds`;
  const of = budget != null ? ` of the ${budget} allowed` : '';
  const how =
    rounds === 1
      ? converged
        ? ': it converged at the first check.'
        : '.'
      : `: the first check missed the thresholds, so it continued ${rounds - 1} time${rounds === 2 ? '' : 's'} from its own estimates (a Newton step from the last check, then a new Phase 3)` +
        (converged ? ' and then converged.' : ' and still did not converge.');
  return `${took}${of}${how}`;
}

export function duration(seconds: number): string {
  if (seconds < 1) return 'under a second';
  if (seconds < 90) return `${seconds.toFixed(seconds < 10 ? 1 : 0)} s`;
  return `${Math.floor(seconds / 60)} min ${Math.round(seconds % 60)} s`;
}
