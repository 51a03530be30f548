import { useLocalSearchParams } from 'expo-router';
import { useState } from 'react';
import { Linking, View } from 'react-native';
import { can } from '../../shared/api';
import type { BatchDetail, GofSummaryRow } from '../../shared/batches';
import { StaleDataBanner } from '../data/StaleDataBanner';
import { getApiBase, messageOf } from '../api/client';
import { parseStudyId, useStudy } from '../studies/queries';
import { StudyNotFound } from '../studies/StudyNotFound';
import { Badge } from '../ui/Badge';
import { Banner } from '../ui/Banner';
import { Button, ButtonRow } from '../ui/Button';
import { Card } from '../ui/Card';
import { formatDate, plural } from '../ui/format';
import { Loading, LoadError } from '../ui/Loading';
import { Screen } from '../ui/Screen';
import { SegmentedControl } from '../ui/SegmentedControl';
import { Table, type Column } from '../ui/Table';
import { Text } from '../ui/Text';
import { TextLink } from '../ui/TextLink';
import { colors } from '../ui/theme';
import { space } from '../ui/tokens';
import { figure, formatP, pWord, stateWords, timeLeft } from './format';
import { ProgressBar } from './ProgressBar';
import { parseId } from '../api/params';
import { batchKeys, useBatch, useBatchMutations, useConsensus, useGof, useGofSummary } from './queries';

interface ComponentRow {
  component: string;
  observed: number;
  narrow: [number, number];
  wide: [number, number];
  outsideNarrow: boolean;
  outsideWide: boolean;
}

const componentColumns: Column<ComponentRow>[] = [
  { key: 'component', title: 'Value', flex: 1, render: (r) => <Text variant="figure">{r.component}</Text> },
  {
    key: 'observed',
    title: 'Observed',
    numeric: true,
    flex: 1,
    render: (r) => (
      <Text variant="figure" style={{ color: r.outsideWide ? colors.fail : colors.accent, fontWeight: '600' }}>
        {figure(r.observed)}
        {r.outsideWide ? ' ▲ outside 90%' : r.outsideNarrow ? ' · outside 50%' : ''}
      </Text>
    ),
  },
  { key: 'narrow', title: 'Middle 50% of chains', numeric: true, flex: 1.3, render: (r) => <Text variant="figure">{`${figure(r.narrow[0])} – ${figure(r.narrow[1])}`}</Text> },
  { key: 'wide', title: 'Middle 90% of chains', numeric: true, flex: 1.3, render: (r) => <Text variant="figure">{`${figure(r.wide[0])} – ${figure(r.wide[1])}`}</Text> },
];

/** One statistic: p-value, reading, caution, and on request the observed values against the envelope. */
function StatisticCard({ studyId, batch, row, period }: { studyId: number; batch: BatchDetail; row: GofSummaryRow; period: number }) {
  const [open, setOpen] = useState(false);
  const gof = useGof(studyId, batch, open ? row.statistic : null, period);
  const word = pWord(row.pValue);
  const rows: ComponentRow[] = gof.data
    ? gof.data.components.map((component, k) => {
        const narrow = gof.data!.bands.find((b) => b.coverage === 0.5) ?? gof.data!.bands[0];
        const wide = gof.data!.bands.find((b) => b.coverage === 0.9) ?? gof.data!.bands[gof.data!.bands.length - 1];
        return {
          component,
          observed: gof.data!.observed[k],
          narrow: [narrow.lower[k], narrow.upper[k]],
          wide: [wide.lower[k], wide.upper[k]],
          outsideNarrow: narrow.outside.includes(component),
          outsideWide: wide.outside.includes(component),
        };
      })
    : [];
  return (
    <Card
      title={row.label}
      testID={`gof-${row.statistic}`}
      actions={<Badge label={word.label} tone={word.tone} icon={word.icon} />}
    >
      <View style={{ flexDirection: 'row', flexWrap: 'wrap', gap: space.s3 }}>
        <View style={{ gap: 2 }}>
          <Text variant="figureLarge">{formatP(row.pValue)}</Text>
          <Text variant="caption">p-value (Mahalanobis distance)</Text>
        </View>
        <View style={{ gap: 2 }}>
          <Text variant="figureLarge">{formatP(row.pValueSimulatedOnly)}</Text>
          <Text variant="caption">p-value, simulated networks alone</Text>
        </View>
        <View style={{ gap: 2 }}>
          <Text variant="figureLarge">{row.componentsKept}</Text>
          <Text variant="caption">directions tested</Text>
        </View>
      </View>
      <Text>{row.reading}</Text>
      {row.outsideWide.length > 0 ? (
        <Text variant="small">
          Outside the middle 90% of chains: <Text variant="figure">{row.outsideWide.join(', ')}</Text>
        </Text>
      ) : null}
      {row.caution ? <Banner tone="caution">{row.caution}</Banner> : null}
      <ButtonRow>
        <Button
          label={open ? 'Hide values' : 'Show values'}
          variant="secondary"
          onPress={() => setOpen((o) => !o)}
          accessibilityLabel={`${open ? 'Hide' : 'Show'} the values of ${row.label}`}
          testID={`gof-toggle-${row.statistic}`}
        />
        <Button
          label="Download chains (CSV)"
          variant="quiet"
          onPress={() => void Linking.openURL(getApiBase().replace(/\/api$/, '') + batchKeys.csv(studyId, batch.id, row.statistic, period))}
          accessibilityLabel={`Download the simulated ${row.label} of every chain as CSV`}
        />
      </ButtonRow>
      {open && gof.isLoading ? <Loading label="Computing the envelope…" /> : null}
      {open && gof.error ? <LoadError message={gof.error.message} onRetry={() => void gof.mutate()} /> : null}
      {open && gof.data ? (
        <Table label={`${row.label}: observed against the simulated chains`} columns={componentColumns} rows={rows} rowKey={(r) => r.component} />
      ) : null}
    </Card>
  );
}

const THRESHOLDS = ['0.3', '0.5', '0.7'] as const;

function ConsensusCard({ studyId, batch, period }: { studyId: number; batch: BatchDetail; period: number }) {
  const [threshold, setThreshold] = useState<(typeof THRESHOLDS)[number]>('0.5');
  const { data, error, mutate } = useConsensus(studyId, batch, period, Number(threshold));
  const pct = (x: number | null) => (x == null ? '—' : `${Math.round(x * 100)}%`);
  return (
    <Card title="Consensus network" subtitle="The ties that at least a given share of chains ended with, set against the observed end wave." testID="consensus">
      <SegmentedControl
        label="Keep ties present in at least"
        options={THRESHOLDS.map((t) => ({ value: t, label: `${Number(t) * 100}% of chains` }))}
        value={threshold}
        onChange={setThreshold}
      />
      {error ? <LoadError message={error.message} onRetry={() => void mutate()} /> : null}
      {data ? (
        <>
          <View style={{ flexDirection: 'row', flexWrap: 'wrap', gap: space.s3 }}>
            {[
              ['Matched', data.comparison.matched],
              ['Missed', data.comparison.missed],
              ['Extra', data.comparison.extra],
            ].map(([label, value]) => (
              <View key={label} style={{ gap: 2 }}>
                <Text variant="figureLarge">{value}</Text>
                <Text variant="caption">{label} ties</Text>
              </View>
            ))}
            <View style={{ gap: 2 }}>
              <Text variant="figureLarge">{pct(data.comparison.jaccard)}</Text>
              <Text variant="caption">overlap (Jaccard)</Text>
            </View>
          </View>
          <Text variant="small">
            The consensus keeps {plural(data.ties.length, 'tie')}; the observed end wave has {data.observedTies} and the chains end with {figure(data.meanSimulatedTies)} on average.
            For comparison, simply keeping the start wave unchanged overlaps the end wave by {pct(data.persistence)}.
          </Text>
          <Text variant="caption">Descriptive only: the consensus network is not a test.</Text>
        </>
      ) : null}
    </Card>
  );
}

export function BatchScreen() {
  const params = useLocalSearchParams<{ studyId: string; batchId: string }>();
  const studyId = parseStudyId(params.studyId);
  const batchId = parseId(params.batchId);
  const study = useStudy(studyId);
  const { data, error, isLoading, mutate } = useBatch(studyId, batchId);
  const { cancel } = useBatchMutations(studyId ?? 0);
  const [period, setPeriod] = useState<string | null>(null);
  const [cancelError, setCancelError] = useState<string | null>(null);
  const [cancelling, setCancelling] = useState(false);
  const batch = data?.batch;
  const chosen = batch ? Number(period ?? batch.periods[0]) : null;
  const summary = useGofSummary(studyId ?? 0, batch, chosen);

  if (studyId === null || batchId === null || study.error?.status === 404 || error?.status === 404) return <StudyNotFound />;
  const active = batch?.state === 'queued' || batch?.state === 'running';
  const mayRun = can(study.data?.study.myRole, 'runBatches');
  const state = batch ? stateWords[batch.state] : null;

  const doCancel = async () => {
    if (!batch) return;
    setCancelling(true);
    setCancelError(null);
    try {
      await cancel(batch.id);
    } catch (e) {
      setCancelError(messageOf(e));
    } finally {
      setCancelling(false);
    }
  };

  return (
    <Screen
      overline="Simulation batch"
      title={batch?.label ?? 'Batch'}
      subtitle={batch ? `${plural(batch.chains, 'chain')} · seed ${batch.seed} · started ${formatDate(batch.createdAt)}${batch.createdBy ? ` by ${batch.createdBy}` : ''}` : undefined}
      above={<TextLink href={`/studies/${studyId}/batches`}>← Batches</TextLink>}
      actions={
        active && mayRun ? (
          <Button label="Cancel batch" variant="danger" onPress={doCancel} loading={cancelling} testID="batch-cancel" />
        ) : batch?.state === 'done' ? (
          <ButtonRow>
            <Button label="Watch chains" variant="secondary" href={`/studies/${studyId}/explore/batches/${batch.id}`} testID="batch-explore" />
            <Button label="Review board" icon="pass" href={`/studies/${studyId}/board/${batch.id}`} />
          </ButtonRow>
        ) : undefined
      }
      testID="batch-page"
    >
      {error ? <LoadError message={error.message} onRetry={() => void mutate()} /> : null}
      {isLoading && !batch ? <Loading label="Loading the batch…" /> : null}
      {cancelError ? <Banner tone="error">{cancelError}</Banner> : null}
      {batch && studyId !== null ? <StaleDataBanner studyId={studyId} createdAt={batch.createdAt} what="batch" /> : null}
      {batch && state ? (
        <>
          <Card>
            <View style={{ flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', gap: space.s1 }}>
              <Badge label={state.label} tone={state.tone} icon={state.icon} />
              <Text variant="caption">
                {batch.source === 'fit' ? `Fit ${batch.fitId}` : 'Hand-entered model'} · period{batch.periods.length > 1 ? 's' : ''} {batch.periods.join(', ')} · {batch.actors} actors
              </Text>
            </View>
            {active ? (
              <ProgressBar
                testID="batch-progress"
                done={batch.chainsDone}
                total={batch.chainsTotal}
                caption={batch.state === 'queued' ? 'waiting for a worker' : timeLeft(batch.secondsLeft)}
              />
            ) : null}
            {batch.state === 'failed' ? <Banner tone="error">{batch.error ?? 'The batch failed.'}</Banner> : null}
            {batch.state === 'cancelled' ? <Banner tone="caution">This batch was cancelled; it keeps no results.</Banner> : null}
            <Text variant="caption">
              Rates {batch.model.rates.map((r, k) => (r == null ? null : `period ${k + 1}: ${figure(r)}`)).filter(Boolean).join(', ')} ·{' '}
              {batch.model.effects.map((e) => `${e.label} ${figure(e.value)}`).join(' · ')}
            </Text>
          </Card>
          {batch.state === 'done' ? (
            <>
              {batch.periods.length > 1 ? (
                <SegmentedControl
                  label="Period"
                  options={batch.periods.map((p) => ({ value: String(p), label: `Period ${p}` }))}
                  value={String(chosen)}
                  onChange={setPeriod}
                />
              ) : null}
              {summary.error ? <LoadError message={summary.error.message} onRetry={() => void summary.mutate()} /> : null}
              {summary.isLoading ? <Loading label="Comparing the chains with the observed wave…" /> : null}
              {summary.data ? (
                <View style={{ gap: space.s2 }}>
                  <Text variant="muted">
                    Each statistic of the observed end wave set against the {plural(summary.data.chains, 'chain')}: a small p-value means the observed network is
                    unusual for this model. The team's verdicts belong on the review board.
                  </Text>
                  {summary.data.rows.map((row) => (
                    <StatisticCard key={`${row.statistic}-${chosen}`} studyId={studyId} batch={batch} row={row} period={chosen!} />
                  ))}
                  <ConsensusCard studyId={studyId} batch={batch} period={chosen!} />
                </View>
              ) : null}
            </>
          ) : null}
        </>
      ) : null}
    </Screen>
  );
}
