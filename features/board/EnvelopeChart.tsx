/**
 * One statistic's envelope chart, drawn with victory-native (react-native-svg underneath): two
 * shaded bands in the two slate blues (the wide coverage underneath), the observed values as marked
 * points joined by a line in the accent colour, a ring around points outside the wide band and a
 * triangle for a standardised value beyond the axis. The geometry (standardising, ticks) is shared
 * with the PDF report (plotSeries in shared/review.ts). For screen readers the chart is one image
 * with a sentence saying where the observed values fall.
 */
import { useState } from 'react';
import { View } from 'react-native';
import { VictoryArea, VictoryAxis, VictoryChart, VictoryLine, VictoryScatter } from 'victory-native';
import { plotSeries, type EnvelopeChartDto } from '../../shared/review';
import { Text } from '../ui/Text';
import { colors } from '../ui/theme';
import { fonts, space } from '../ui/tokens';

const HEIGHT = 200;

export function describeChart(chart: EnvelopeChartDto): string {
  const wide = [...chart.bands].sort((a, b) => b.coverage - a.coverage)[0];
  const narrow = [...chart.bands].sort((a, b) => a.coverage - b.coverage)[0];
  const pct = (c: number) => `${Math.round(c * 100)}%`;
  const out = wide?.outside ?? [];
  const outNarrow = (narrow?.outside ?? []).filter((c) => !out.includes(c));
  const parts = [`Envelope chart of the ${chart.label.toLowerCase()}, ${chart.period === 'all' ? 'all periods together' : `period ${chart.period}`}, ${chart.components.length} values.`];
  parts.push(out.length ? `Observed outside the middle ${pct(wide!.coverage)} of simulations at ${out.join(', ')}.` : `Every observed value lies inside the middle ${pct(wide?.coverage ?? 0.9)} of simulations.`);
  if (outNarrow.length && narrow && narrow !== wide) parts.push(`Outside the middle ${pct(narrow.coverage)} only: ${outNarrow.join(', ')}.`);
  return parts.join(' ');
}

export function EnvelopeChart({ chart }: { chart: EnvelopeChartDto }) {
  const [width, setWidth] = useState(0);
  const series = plotSeries(chart);
  const n = series.labels.length;
  const xs = series.labels.map((_, k) => k + 1);
  const step = width > 0 ? (width - 56) / Math.max(1, n) : 30;
  const every = Math.max(1, Math.ceil(34 / Math.max(step, 1)));
  const axisText = { fontFamily: fonts.mono, fontSize: 11, fill: colors.muted };
  const [wideBand, narrowBand] = series.bands;

  return (
    <View
      accessibilityRole="image"
      accessibilityLabel={describeChart(chart)}
      onLayout={(e) => setWidth(Math.round(e.nativeEvent.layout.width))}
      style={{ width: '100%', minHeight: HEIGHT }}
      testID={`chart-${chart.statistic}-${chart.period}`}
    >
      {width > 0 ? (
        <VictoryChart
          width={width}
          height={HEIGHT}
          padding={{ top: 10, bottom: 30, left: 44, right: 12 }}
          domain={{ x: [0.5, n + 0.5], y: [series.yMin, series.yMax] }}
          domainPadding={{ x: 0, y: 0 }}
          standalone
        >
          <VictoryAxis
            dependentAxis
            tickValues={series.ticks}
            tickFormat={(t: number) => (Math.abs(t) >= 1000 ? `${Math.round(t / 100) / 10}k` : String(Math.round(t * 10) / 10))}
            style={{ axis: { stroke: colors.rule }, grid: { stroke: colors.rule, strokeWidth: 1 }, tickLabels: axisText, ticks: { stroke: 'transparent' } }}
          />
          <VictoryAxis
            offsetY={30}
            crossAxis={false}
            tickValues={xs}
            tickFormat={(t: number) => ((t - 1) % every === 0 ? series.labels[t - 1] ?? '' : '')}
            style={{ axis: { stroke: colors.ruleStrong }, tickLabels: { ...axisText, padding: 4 }, ticks: { stroke: 'transparent' }, grid: { stroke: 'transparent' } }}
          />
          {series.scale === 'standardised' ? (
            <VictoryLine data={[{ x: 0.5, y: 0 }, { x: n + 0.5, y: 0 }]} style={{ data: { stroke: colors.muted, strokeWidth: 1 } }} />
          ) : null}
          {wideBand ? (
            <VictoryArea
              data={xs.map((x, k) => ({ x, y: wideBand.upper[k], y0: wideBand.lower[k] }))}
              style={{ data: { fill: colors.envelopeWide, fillOpacity: 0.5, stroke: colors.envelopeWide, strokeWidth: 1 } }}
            />
          ) : null}
          {narrowBand ? (
            <VictoryArea
              data={xs.map((x, k) => ({ x, y: narrowBand.upper[k], y0: narrowBand.lower[k] }))}
              style={{ data: { fill: colors.envelopeNarrow, fillOpacity: 0.65, stroke: colors.envelopeNarrow, strokeWidth: 1 } }}
            />
          ) : null}
          <VictoryLine data={xs.map((x, k) => ({ x, y: series.observed[k] }))} style={{ data: { stroke: colors.accent, strokeWidth: 2 } }} />
          <VictoryScatter
            data={xs.map((x, k) => ({ x, y: series.observed[k], clamped: series.clamped[k], up: series.observed[k] > 0 }))}
            size={({ datum }: { datum?: { clamped: boolean } }) => (datum?.clamped ? 5 : 3.5)}
            symbol={({ datum }: { datum?: { clamped: boolean; up: boolean } }) => (datum?.clamped ? (datum.up ? 'triangleUp' : 'triangleDown') : 'circle')}
            style={{ data: { fill: colors.accent } }}
          />
          <VictoryScatter
            data={xs.filter((_, k) => series.outside[k]).map((x) => ({ x, y: series.observed[x - 1] }))}
            size={7}
            style={{ data: { fill: 'none', stroke: colors.accent, strokeWidth: 1.5 } }}
          />
        </VictoryChart>
      ) : null}
    </View>
  );
}

/** The legend in words, with small swatches (never colour alone). */
export function EnvelopeLegend({ chart }: { chart: EnvelopeChartDto }) {
  const coverages = chart.bands.map((b) => b.coverage).sort((a, b) => b - a);
  const item = (swatch: React.ReactNode, label: string) => (
    <View key={label} style={{ flexDirection: 'row', alignItems: 'center', gap: space.half }}>
      {swatch}
      <Text variant="caption">{label}</Text>
    </View>
  );
  const box = (colour: string, opacity: number) => <View style={{ width: 16, height: 10, backgroundColor: colour, opacity }} />;
  return (
    <View style={{ gap: space.half }}>
      <View style={{ flexDirection: 'row', flexWrap: 'wrap', columnGap: space.s2, rowGap: space.half }}>
        {coverages[0] !== undefined ? item(box(colors.envelopeWide, 0.6), `middle ${Math.round(coverages[0] * 100)}% of simulations`) : null}
        {coverages[1] !== undefined ? item(box(colors.envelopeNarrow, 0.8), `middle ${Math.round(coverages[1] * 100)}%`) : null}
        {item(
          <View style={{ width: 16, height: 10, justifyContent: 'center', alignItems: 'center' }}>
            <View style={{ position: 'absolute', left: 0, right: 0, height: 2, backgroundColor: colors.accent }} />
            <View style={{ width: 7, height: 7, borderRadius: 4, backgroundColor: colors.accent }} />
          </View>,
          'observed',
        )}
        {item(
          <View style={{ width: 14, height: 14, borderRadius: 7, borderWidth: 1.5, borderColor: colors.accent, alignItems: 'center', justifyContent: 'center' }}>
            <View style={{ width: 6, height: 6, borderRadius: 3, backgroundColor: colors.accent }} />
          </View>,
          `outside the ${Math.round((coverages[0] ?? 0.9) * 100)}% band`,
        )}
      </View>
      {chart.scale === 'standardised' ? (
        <Text variant="caption">Drawn standardised: each value as its distance from the simulated mean in standard deviations, because the components differ too much in size to share one axis.</Text>
      ) : null}
    </View>
  );
}
