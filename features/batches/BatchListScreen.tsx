import { useLocalSearchParams } from 'expo-router';
import { View } from 'react-native';
import { can } from '../../shared/api';
import type { BatchSummary } from '../../shared/batches';
import { StaleBadge } from '../data/StaleDataBanner';
import { parseStudyId, useStudy } from '../studies/queries';
import { StudyNotFound } from '../studies/StudyNotFound';
import { Badge } from '../ui/Badge';
import { Button } from '../ui/Button';
import { Card } from '../ui/Card';
import { EmptyState } from '../ui/EmptyState';
import { formatDate, plural } from '../ui/format';
import { Loading, LoadError } from '../ui/Loading';
import { Screen } from '../ui/Screen';
import { Text } from '../ui/Text';
import { TextLink } from '../ui/TextLink';
import { space } from '../ui/tokens';
import { stateWords, timeLeft } from './format';
import { ProgressBar } from './ProgressBar';
import { useBatches } from './queries';

function BatchRow({ studyId, batch }: { studyId: number; batch: BatchSummary }) {
  const state = stateWords[batch.state];
  const active = batch.state === 'queued' || batch.state === 'running';
  return (
    <Card testID={`batch-${batch.id}`}>
      <View style={{ flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', justifyContent: 'space-between', gap: space.s1 }}>
        <TextLink href={`/studies/${studyId}/batches/${batch.id}`} accessibilityLabel={`Open ${batch.label}`}>
          {batch.label}
        </TextLink>
        <View style={{ flexDirection: 'row', gap: space.half }}>
          <StaleBadge studyId={studyId} createdAt={batch.createdAt} />
          <Badge label={state.label} tone={state.tone} icon={state.icon} />
        </View>
      </View>
      <Text variant="caption">
        {plural(batch.chains, 'chain')} · period{batch.periods.length > 1 ? 's' : ''} {batch.periods.join(', ')} ·{' '}
        {batch.source === 'fit' ? `fit ${batch.fitId}` : 'hand-entered model'} · seed {batch.seed} · {formatDate(batch.createdAt)}
        {batch.createdBy ? ` by ${batch.createdBy}` : ''}
      </Text>
      {active ? <ProgressBar done={batch.chainsDone} total={batch.chainsTotal} caption={batch.state === 'queued' ? 'waiting for a worker' : timeLeft(batch.secondsLeft)} /> : null}
      {batch.state === 'failed' && batch.error ? <Text variant="small">{batch.error}</Text> : null}
    </Card>
  );
}

export function BatchListScreen() {
  const params = useLocalSearchParams<{ studyId: string }>();
  const studyId = parseStudyId(params.studyId);
  const study = useStudy(studyId);
  const { data, error, isLoading, mutate } = useBatches(studyId);
  if (studyId === null || study.error?.status === 404 || error?.status === 404) return <StudyNotFound />;
  const mayRun = can(study.data?.study.myRole, 'runBatches');
  const batches = data?.batches ?? [];
  return (
    <Screen
      overline="Simulation batches"
      title={study.data?.study.name ?? 'Batches'}
      subtitle="Each batch simulates a model many times from the observed waves, to compare with what happened next."
      above={<TextLink href={`/studies/${studyId}`}>← Study overview</TextLink>}
      actions={mayRun ? <Button label="New batch" icon="plus" href={`/studies/${studyId}/batches/new`} testID="batch-new" /> : undefined}
      testID="batch-list"
    >
      {error ? <LoadError message={error.message} onRetry={() => void mutate()} /> : null}
      {isLoading && !data ? <Loading label="Loading the batches…" /> : null}
      {data && batches.length === 0 ? (
        <EmptyState
          title="No batches yet"
          message={
            mayRun
              ? 'Simulate a fitted model (or values you enter) to see how well it reproduces the next wave.'
              : 'A lead or statistician of this study can start one; you can read the results here.'
          }
          action={mayRun ? <Button label="New batch" icon="plus" href={`/studies/${studyId}/batches/new`} /> : undefined}
        />
      ) : null}
      <View style={{ gap: space.s2 }}>
        {batches.map((b) => (
          <BatchRow key={b.id} studyId={studyId} batch={b} />
        ))}
      </View>
    </Screen>
  );
}
