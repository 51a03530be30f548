/**
 * Envelope charts of the review board: the board and the PDF report draw the same picture from this
 * geometry (scale, plotted values, ticks), and say a p-value in the same words. Part of the review
 * contract; shared/review.ts re-exports it.
 */
import type { AuxStatisticId } from './auxStatistics';
import type { EnvelopeBandDto, MahalanobisDto } from './batches';

/**
 * How a statistic is drawn. Counts on one scale (degree and distance distributions) are drawn as they
 * are; statistics whose components live on very different scales (the triad census, where 003 dwarfs
 * 300; the dyad census next to the reciprocity index) are drawn standardised: each component as its
 * distance from the simulated mean in simulated standard deviations, so every component is readable.
 */
export type ChartScale = 'counts' | 'standardised';

export function chartScaleOf(statistic: AuxStatisticId): ChartScale {
  return statistic === 'triad_census' || statistic === 'dyad_census' ? 'standardised' : 'counts';
}

/** One card's envelope data (GET .../board/chart?statistic=&period=). Values are in the statistic's own units. */
export interface EnvelopeChartDto {
  batchId: number;
  statistic: AuxStatisticId;
  label: string;
  /** A period, or 'all': every period summed chain by chain (read-only; verdicts stay per period). */
  period: number | 'all';
  components: string[];
  observed: number[];
  mean: number[];
  /** Simulated standard deviation per component (n - 1 in the denominator). */
  sd: number[];
  bands: EnvelopeBandDto[];
  pValue: number;
  pValueSimulatedOnly: number;
  distance: number;
  chains: number;
  outOfSupport: MahalanobisDto['outOfSupport'];
  reading: string;
  caution: string | null;
  scale: ChartScale;
}

export interface PlotSeries {
  scale: ChartScale;
  /** What the vertical axis shows, in words. */
  yLabel: string;
  labels: string[];
  observed: number[];
  /** Bands, widest first (drawn first, underneath). */
  bands: { coverage: number; lower: number[]; upper: number[] }[];
  /** Per component: the observed value lies outside the widest band. */
  outside: boolean[];
  /** Per component: the observed value was clamped to the edge of the axis. */
  clamped: boolean[];
  yMin: number;
  yMax: number;
  ticks: number[];
}

/** Largest |z| drawn; farther values sit on the edge with a mark. */
export const Z_LIMIT = 6;

/** About `count` round tick values covering [min, max] (steps 1, 2 or 5 times a power of ten). */
export function niceTicks(min: number, max: number, count = 5): number[] {
  if (!Number.isFinite(min) || !Number.isFinite(max)) return [0];
  if (max < min) [min, max] = [max, min];
  if (max === min) return [min];
  const raw = (max - min) / Math.max(1, count);
  const power = 10 ** Math.floor(Math.log10(raw));
  const step = [1, 2, 2.5, 5, 10].map((m) => m * power).find((s) => s >= raw) ?? 10 * power;
  const ticks: number[] = [];
  for (let v = Math.ceil(min / step - 1e-9) * step; v <= max + step * 1e-9; v += step) ticks.push(Math.round(v / step) * step);
  return ticks;
}

/** The plotted values of a card: raw counts, or standardised components (see chartScaleOf). */
export function plotSeries(
  chart: Pick<EnvelopeChartDto, 'components' | 'observed' | 'mean' | 'sd' | 'scale'> & { bands: { coverage: number; lower: number[]; upper: number[] }[] },
): PlotSeries {
  const bands = [...chart.bands].sort((a, b) => b.coverage - a.coverage).map((b) => ({ coverage: b.coverage, lower: [...b.lower], upper: [...b.upper] }));
  const wide = bands[0];
  const outside = chart.observed.map((x, k) => (wide ? x < wide.lower[k] - 1e-9 || x > wide.upper[k] + 1e-9 : false));
  let observed = [...chart.observed];
  const clamped = observed.map(() => false);
  if (chart.scale === 'standardised') {
    const z = (x: number, k: number) => {
      const sd = chart.sd[k];
      const d = x - chart.mean[k];
      if (!(sd > 0)) return Math.abs(d) < 1e-9 ? 0 : Math.sign(d) * Infinity;
      return d / sd;
    };
    observed = observed.map((x, k) => z(x, k));
    for (const b of bands) {
      b.lower = b.lower.map((x, k) => z(x, k));
      b.upper = b.upper.map((x, k) => z(x, k));
    }
    observed = observed.map((v, k) => {
      if (Math.abs(v) > Z_LIMIT) {
        clamped[k] = true;
        return Math.sign(v) * Z_LIMIT;
      }
      return v;
    });
  }
  const values = [...observed, ...bands.flatMap((b) => [...b.lower, ...b.upper])].filter(Number.isFinite);
  let lo = Math.min(...values);
  let hi = Math.max(...values);
  if (chart.scale === 'counts') lo = Math.min(0, lo);
  else {
    lo = Math.min(lo, -2);
    hi = Math.max(hi, 2);
  }
  if (hi === lo) hi = lo + 1;
  const ticks = niceTicks(lo, hi, 4);
  return {
    scale: chart.scale,
    yLabel: chart.scale === 'counts' ? 'count' : 'standard deviations from the simulated mean',
    labels: chart.components,
    observed,
    bands,
    outside,
    clamped,
    yMin: Math.min(lo, ticks[0]),
    yMax: Math.max(hi, ticks[ticks.length - 1]),
    ticks,
  };
}

/** A p-value in plain words (the verdict stays the team's). */
export function pValueWords(p: number): { short: string; sentence: string } {
  if (p < 0.05) return { short: 'Clearly unlike', sentence: 'The observed network is clearly unlike the simulated ones.' };
  if (p < 0.1) return { short: 'Borderline', sentence: 'The observed network sits at the edge of what the model produces.' };
  return { short: 'Looks alike', sentence: 'The observed network looks like the simulated ones.' };
}

export function formatPValue(p: number): string {
  return p < 0.001 ? p.toExponential(1) : p.toFixed(3);
}
