/**
 * The plots of a re-fit study, drawn with victory-native (react-native-svg underneath):
 * - EstimateDots: one parameter, one row per group (a model fitted to some model's panels), every
 *   re-fit's estimate as a dot (rows jittered a little, deterministically), the generating value of
 *   each row marked by a dark vertical bar and the mean by an open diamond. Rows carry their names in
 *   words beside the chart, so nothing depends on colour.
 * - PairScatter: two parameters' estimates across re-fits, with the generating values as a cross.
 * For screen readers each chart is one image with a sentence of what it shows.
 */
import { useState } from 'react';
import { View } from 'react-native';
import { VictoryAxis, VictoryChart, VictoryLine, VictoryScatter } from 'victory-native';
import type { RefitParameterSummary } from '../../shared/refits';
import { Text } from '../ui/Text';
import { colors } from '../ui/theme';
import { fonts, space } from '../ui/tokens';

export const GROUP_COLOURS = [colors.accent, colors.envelopeNarrow, colors.unsure, colors.muted];
const axisText = { fontFamily: fonts.mono, fontSize: 11, fill: colors.muted };
const fmt = (x: number) => (Math.abs(x) >= 100 ? x.toFixed(0) : Math.abs(x) >= 10 ? x.toFixed(1) : x.toFixed(2));

/** A small deterministic jitter in [-0.25, 0.25] from the index (no randomness in the view). */
const jitter = (k: number) => (((k * 0.618033988749895) % 1) - 0.5) * 0.5;

function extent(values: number[]): [number, number] {
  let lo = Math.min(...values);
  let hi = Math.max(...values);
  if (!Number.isFinite(lo) || !Number.isFinite(hi)) return [-1, 1];
  if (hi - lo < 1e-9) {
    lo -= 0.5;
    hi += 0.5;
  }
  const pad = (hi - lo) * 0.06;
  return [lo - pad, hi + pad];
}

export interface DotRow {
  title: string;
  colour: string;
  summary: RefitParameterSummary;
}

export function EstimateDots({ label, rows, testID }: { label: string; rows: DotRow[]; testID?: string }) {
  const [width, setWidth] = useState(0);
  const all = rows.flatMap((r) => [...r.summary.estimates, r.summary.truth]);
  const [lo, hi] = extent(all);
  const height = 44 + 46 * rows.length;
  const description =
    `Estimates of ${label} across re-fits. ` +
    rows
      .map((r) => `${r.title}: ${r.summary.count} re-fits, mean ${r.summary.meanEstimate == null ? 'none' : fmt(r.summary.meanEstimate)}, generating value ${fmt(r.summary.truth)}.`)
      .join(' ');
  return (
    <View style={{ gap: space.half }} testID={testID}>
      <View accessibilityRole="image" accessibilityLabel={description} onLayout={(e) => setWidth(Math.round(e.nativeEvent.layout.width))} style={{ width: '100%', minHeight: height }}>
        {width > 0 ? (
          <VictoryChart width={width} height={height} padding={{ top: 8, bottom: 30, left: 16, right: 16 }} domain={{ x: [lo, hi], y: [0.4, rows.length + 0.6] }} standalone>
            <VictoryAxis
              crossAxis={false}
              orientation="bottom"
              tickCount={width < 360 ? 4 : 6}
              tickFormat={(t: number) => fmt(t)}
              style={{ axis: { stroke: colors.ruleStrong }, grid: { stroke: colors.rule, strokeWidth: 1 }, tickLabels: axisText, ticks: { stroke: 'transparent' } }}
            />
            {rows.map((r, k) => (
              <VictoryScatter
                key={`dots-${k}`}
                data={r.summary.estimates.map((x, i) => ({ x, y: rows.length - k + jitter(i) }))}
                size={width < 400 ? 2.5 : 3}
                style={{ data: { fill: r.colour, fillOpacity: 0.55, stroke: r.colour, strokeWidth: 0.5 } }}
              />
            ))}
            {rows.map((r, k) => (
              <VictoryLine
                key={`truth-${k}`}
                data={[
                  { x: r.summary.truth, y: rows.length - k - 0.42 },
                  { x: r.summary.truth, y: rows.length - k + 0.42 },
                ]}
                style={{ data: { stroke: colors.ink, strokeWidth: 2.5 } }}
              />
            ))}
            {rows.map((r, k) =>
              r.summary.meanEstimate == null ? null : (
                <VictoryScatter
                  key={`mean-${k}`}
                  data={[{ x: r.summary.meanEstimate, y: rows.length - k }]}
                  symbol="diamond"
                  size={6}
                  style={{ data: { fill: colors.surface, stroke: colors.ink, strokeWidth: 1.5 } }}
                />
              ),
            )}
          </VictoryChart>
        ) : null}
      </View>
      {rows.map((r, k) => (
        <View key={k} style={{ flexDirection: 'row', alignItems: 'center', gap: space.half }}>
          <View style={{ width: 10, height: 10, borderRadius: 5, backgroundColor: r.colour }} />
          <Text variant="caption" style={{ flexShrink: 1 }}>
            {`Row ${k + 1}: ${r.title} · ${r.summary.count} re-fits · generating value ${fmt(r.summary.truth)}`}
          </Text>
        </View>
      ))}
    </View>
  );
}

export function PairScatter({ a, b, r, colour, testID }: { a: RefitParameterSummary; b: RefitParameterSummary; r: number | null; colour: string; testID?: string }) {
  const [width, setWidth] = useState(0);
  const n = Math.min(a.estimates.length, b.estimates.length);
  const data = Array.from({ length: n }, (_, k) => ({ x: a.estimates[k], y: b.estimates[k] }));
  const [xlo, xhi] = extent([...a.estimates, a.truth]);
  const [ylo, yhi] = extent([...b.estimates, b.truth]);
  const height = Math.min(360, Math.max(240, width * 0.7));
  return (
    <View
      accessibilityRole="image"
      accessibilityLabel={`Scatter of ${n} re-fits: ${a.label} across, ${b.label} up; correlation ${r == null ? 'not defined' : r.toFixed(2)}. The cross marks the generating values.`}
      onLayout={(e) => setWidth(Math.round(e.nativeEvent.layout.width))}
      style={{ width: '100%', minHeight: height }}
      testID={testID}
    >
      {width > 0 ? (
        <VictoryChart width={width} height={height} padding={{ top: 10, bottom: 40, left: 52, right: 14 }} domain={{ x: [xlo, xhi], y: [ylo, yhi] }} standalone>
          <VictoryAxis
            crossAxis={false}
            orientation="bottom"
            tickCount={width < 360 ? 4 : 6}
            tickFormat={(t: number) => fmt(t)}
            label={a.label}
            style={{ axis: { stroke: colors.ruleStrong }, grid: { stroke: colors.rule }, tickLabels: axisText, axisLabel: { ...axisText, padding: 26 }, ticks: { stroke: 'transparent' } }}
          />
          <VictoryAxis
            dependentAxis
            crossAxis={false}
            orientation="left"
            tickCount={5}
            tickFormat={(t: number) => fmt(t)}
            style={{ axis: { stroke: colors.ruleStrong }, grid: { stroke: colors.rule }, tickLabels: axisText, ticks: { stroke: 'transparent' } }}
          />
          <VictoryScatter data={data} size={3} style={{ data: { fill: colour, fillOpacity: 0.55, stroke: colour, strokeWidth: 0.5 } }} />
          <VictoryScatter data={[{ x: a.truth, y: b.truth }]} symbol="plus" size={8} style={{ data: { fill: colors.ink } }} />
        </VictoryChart>
      ) : null}
    </View>
  );
}
