/**
 * The consensus network of a batch: ties that appear in at least a chosen share of the simulated end
 * networks, drawn over the observed end wave (matched, missed, extra), with the counts beside it:
 * matched, missed, extra, the Jaccard index and the persistence baseline (the Jaccard index of the
 * start and end waves: how well "nothing changes" would do).
 */
import { useLocalSearchParams } from 'expo-router';
import { useMemo, useState } from 'react';
import { View } from 'react-native';
import { useBatch, useConsensus } from '../batches/queries';
import { parseId } from '../api/params';
import { useConsensusLayout } from './queries';
import { parseStudyId, useStudy } from '../studies/queries';
import { StudyNotFound } from '../studies/StudyNotFound';
import { Card } from '../ui/Card';
import { Loading, LoadError } from '../ui/Loading';
import { Screen } from '../ui/Screen';
import { SegmentedControl } from '../ui/SegmentedControl';
import { Text } from '../ui/Text';
import { TextLink } from '../ui/TextLink';
import { colors } from '../ui/theme';
import { space } from '../ui/tokens';
import { useBreakpoint } from '../ui/useBreakpoint';
import { classifyTies, countKinds } from './classify';
import { NetworkDrawing, NodeGlyph, SHAPES, TieLegend, type NodeStyle } from './NetworkDrawing';
import { ThresholdStepper } from './ThresholdStepper';
import { ChoiceChips } from './ChoiceChips';
import Svg from 'react-native-svg';

const BASE_RADIUS = 13;

function Figure({ label, value, hint }: { label: string; value: string; hint?: string }) {
  return (
    <View style={{ minWidth: 120, gap: 2 }} accessibilityLabel={`${label}: ${value}${hint ? `. ${hint}` : ''}`}>
      <Text variant="figureLarge">{value}</Text>
      <Text variant="label">{label}</Text>
      {hint ? <Text variant="caption">{hint}</Text> : null}
    </View>
  );
}

const fmt = (x: number | null) => (x === null ? '—' : x.toFixed(2));

export function ConsensusScreen() {
  const params = useLocalSearchParams<{ studyId: string; batchId: string }>();
  const studyId = parseStudyId(params.studyId);
  const batchId = parseId(params.batchId);
  const study = useStudy(studyId);
  const batch = useBatch(studyId, batchId);
  const b = batch.data?.batch;
  const [periodChoice, setPeriodChoice] = useState<string | null>(null);
  const period = periodChoice !== null ? Number(periodChoice) : (b?.periods[0] ?? null);
  const [threshold, setThreshold] = useState(0.5);
  const [covariate, setCovariate] = useState<string>('none');
  const layout = useConsensusLayout(studyId ?? 0, b?.state === 'done' ? batchId : null, period);
  const consensus = useConsensus(studyId ?? 0, b, period, threshold);
  const { width, compact, gutter } = useBreakpoint();
  const drawingWidth = Math.min(compact ? width - 2 * gutter - 2 : 560, 560);

  const nodeStyles = useMemo<NodeStyle[]>(() => {
    const l = layout.data;
    if (!l) return [];
    const cov = l.covariates.find((c) => c.name === covariate);
    if (!cov) return l.actors.map(() => ({ radius: BASE_RADIUS, shape: 'circle', hollow: false }));
    if (cov.kind === 'numeric') {
      const vals = cov.values.filter((v): v is number => typeof v === 'number');
      const lo = Math.min(...vals);
      const hi = Math.max(...vals);
      return cov.values.map((v) =>
        typeof v === 'number' ? { radius: 8 + (hi > lo ? (v - lo) / (hi - lo) : 0.5) * 16, shape: 'circle' as const, hollow: false } : { radius: 8, shape: 'circle' as const, hollow: true },
      );
    }
    return cov.values.map((v) => {
      const k = v === null ? -1 : cov.categories.indexOf(String(v));
      return k < 0 ? { radius: BASE_RADIUS, shape: 'circle' as const, hollow: true } : { radius: BASE_RADIUS, shape: SHAPES[k % SHAPES.length], hollow: false };
    });
  }, [layout.data, covariate]);

  if (studyId === null || batchId === null || study.error?.status === 404 || batch.error?.status === 404) return <StudyNotFound />;

  const ties = consensus.data && layout.data ? classifyTies(consensus.data.ties, layout.data.observedTies) : [];
  const counts = countKinds(ties);
  const cmp = consensus.data?.comparison;
  const cov = layout.data?.covariates.find((c) => c.name === covariate);

  return (
    <Screen
      overline="Consensus network"
      title={b?.label ?? 'Consensus network'}
      subtitle={study.data?.study.name}
      above={<TextLink href={`/studies/${studyId}/board/${batchId}`}>← Review board</TextLink>}
    >
      {batch.error ? <LoadError message={batch.error.message} onRetry={() => void batch.mutate()} /> : null}
      {b && b.state !== 'done' ? <Text variant="muted">The consensus network is shown once the batch is done.</Text> : null}
      {b && b.periods.length > 1 ? (
        <SegmentedControl label="Period" options={b.periods.map((p) => ({ value: String(p), label: `Period ${p}` }))} value={String(period)} onChange={setPeriodChoice} />
      ) : null}
      <Card>
        <ThresholdStepper value={threshold} onChange={setThreshold} />
      </Card>
      {layout.error ? <LoadError message={layout.error.message} onRetry={() => void layout.mutate()} /> : null}
      {consensus.error ? <LoadError message={consensus.error.message} onRetry={() => void consensus.mutate()} /> : null}
      {(layout.isLoading || consensus.isLoading) && !(layout.data && consensus.data) ? <Loading label="Drawing the network…" /> : null}
      {layout.data && consensus.data ? (
        <View style={{ flexDirection: compact ? 'column' : 'row', gap: space.s3, alignItems: 'flex-start' }}>
          <View style={{ gap: space.s1, width: drawingWidth }}>
            <NetworkDrawing
              actors={layout.data.actors}
              positions={layout.data.positions}
              ties={ties}
              nodeStyles={nodeStyles}
              width={drawingWidth}
              label={`Consensus network at ${Math.round(threshold * 100)}% of chains, period ${period}: ${counts.matched} matched, ${counts.missed} missed and ${counts.extra} extra ties among ${layout.data.actors.length} actors.`}
            />
            <Text variant="caption">Node positions are fixed for this batch (a seeded force layout of the observed end wave), so ties can be followed as the threshold moves.</Text>
          </View>
          <View style={{ flex: 1, gap: space.s2, minWidth: compact ? undefined : 260 }}>
            <Card title="Against the observed wave">
              <View style={{ flexDirection: 'row', flexWrap: 'wrap', gap: space.s3 }} testID="consensus-counts">
                <Figure label="Matched" value={String(cmp?.matched ?? counts.matched)} />
                <Figure label="Missed" value={String(cmp?.missed ?? counts.missed)} />
                <Figure label="Extra" value={String(cmp?.extra ?? counts.extra)} />
                <Figure label="Jaccard index" value={fmt(cmp?.jaccard ?? null)} hint="matched / (matched + missed + extra)" />
                <Figure label="Persistence baseline" value={fmt(consensus.data.persistence)} hint="Jaccard index of the start and end waves" />
              </View>
              <Text variant="caption">
                {`${consensus.data.observedTies} observed ties; the simulated networks had ${consensus.data.meanSimulatedTies.toFixed(1)} on average (${consensus.data.chains} chains). The consensus network describes; it is not a test.`}
              </Text>
            </Card>
            <Card title="Legend">
              <TieLegend counts={counts} />
              {layout.data.covariates.length ? (
                <ChoiceChips
                  label="Node size or shape by"
                  options={[{ value: 'none', label: 'None' }, ...layout.data.covariates.map((c) => ({ value: c.name, label: c.name, description: c.kind === 'numeric' ? 'size' : 'shape' }))]}
                  value={covariate}
                  onChange={setCovariate}
                />
              ) : null}
              {cov?.kind === 'numeric' ? <Text variant="small">{`Larger nodes: higher ${cov.name}. A hollow node: value missing.`}</Text> : null}
              {cov?.kind === 'categorical' ? (
                <View role="list" accessibilityLabel={`Node shapes by ${cov.name}`} style={{ gap: 2 }}>
                  {cov.categories.map((cat, k) => (
                    <View role="listitem" key={cat} style={{ flexDirection: 'row', alignItems: 'center', gap: space.s1 }}>
                      <Svg width={22} height={22} viewBox="0 0 40 40" aria-hidden>
                        <NodeGlyph x={20} y={20} style={{ radius: 13, shape: SHAPES[k % SHAPES.length], hollow: false }} fill={colors.ink} stroke={colors.ink} />
                      </Svg>
                      <Text variant="small">{`${cov.name}: ${cat}`}</Text>
                    </View>
                  ))}
                </View>
              ) : null}
            </Card>
          </View>
        </View>
      ) : null}
    </Screen>
  );
}
