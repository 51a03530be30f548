/** Display helpers for batches: states in words, time left, p-values, band figures. */
import type { BadgeTone } from '../ui/Badge';
import type { IconName } from '../ui/icons';
import type { BatchState } from '../../shared/batches';

export const stateWords: Record<BatchState, { label: string; tone: BadgeTone; icon: IconName }> = {
  queued: { label: 'Waiting', tone: 'neutral', icon: 'info' },
  running: { label: 'Running', tone: 'accent', icon: 'info' },
  done: { label: 'Done', tone: 'pass', icon: 'pass' },
  failed: { label: 'Failed', tone: 'fail', icon: 'error' },
  cancelled: { label: 'Cancelled', tone: 'unsure', icon: 'caution' },
};

export function timeLeft(seconds: number | null): string {
  if (seconds == null || !Number.isFinite(seconds)) return 'estimating time left…';
  if (seconds < 1) return 'under a second left';
  if (seconds < 90) return `about ${Math.round(seconds)} s left`;
  return `about ${Math.round(seconds / 60)} min left`;
}

export function formatP(p: number): string {
  return p < 0.001 ? p.toExponential(1) : p.toFixed(3);
}

/** A figure with at most two decimals, no trailing zeros (counts stay whole). */
export function figure(x: number): string {
  if (Number.isInteger(x)) return String(x);
  return String(Math.round(x * 100) / 100);
}

/** The p-value's reading as a word for the badge (our wording; the verdict is the team's). */
export function pWord(p: number): { label: string; tone: BadgeTone; icon: IconName } {
  if (p < 0.05) return { label: 'Poor fit', tone: 'fail', icon: 'fail' };
  if (p < 0.1) return { label: 'Borderline', tone: 'unsure', icon: 'unsure' };
  return { label: 'Acceptable', tone: 'pass', icon: 'pass' };
}
