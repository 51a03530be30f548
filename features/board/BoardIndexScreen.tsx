/** The batches of a study that can be reviewed, each opening its board. */
import { useLocalSearchParams } from 'expo-router';
import { View } from 'react-native';
import { stateWords } from '../batches/format';
import { useBatches } from '../batches/queries';
import { parseStudyId, useStudy } from '../studies/queries';
import { StudyNotFound } from '../studies/StudyNotFound';
import { Badge } from '../ui/Badge';
import { Button } from '../ui/Button';
import { Card } from '../ui/Card';
import { EmptyState } from '../ui/EmptyState';
import { formatDate } from '../ui/format';
import { Loading, LoadError } from '../ui/Loading';
import { Screen } from '../ui/Screen';
import { Text } from '../ui/Text';
import { TextLink } from '../ui/TextLink';
import { space } from '../ui/tokens';

export function BoardIndexScreen() {
  const params = useLocalSearchParams<{ studyId: string }>();
  const studyId = parseStudyId(params.studyId);
  const study = useStudy(studyId);
  const batches = useBatches(studyId);
  if (studyId === null || study.error?.status === 404) return <StudyNotFound />;
  const list = batches.data?.batches ?? [];
  const done = list.filter((b) => b.state === 'done');
  return (
    <Screen
      overline="Review board"
      title="Batches to review"
      subtitle={study.data?.study.name}
      above={<TextLink href={`/studies/${studyId}`}>← Study overview</TextLink>}
      actions={done.length >= 2 ? <Button label="Compare models" variant="secondary" href={`/studies/${studyId}/compare?batches=${done.slice(0, 2).map((b) => b.id).join(',')}`} /> : undefined}
    >
      {batches.error ? <LoadError message={batches.error.message} onRetry={() => void batches.mutate()} /> : null}
      {batches.isLoading ? <Loading label="Loading batches…" /> : null}
      {batches.data && list.length === 0 ? (
        <EmptyState title="No batches yet" message="A statistician simulates a fitted model in a batch; its goodness of fit is reviewed here." />
      ) : null}
      <View role="list" accessibilityLabel="Batches" style={{ gap: space.s2 }}>
        {list.map((b) => {
          const s = stateWords[b.state];
          return (
            <View role="listitem" key={b.id}>
              <Card title={b.label} subtitle={`${b.chains} chains · periods ${b.periods.join(', ')} · ${formatDate(b.createdAt)}${b.createdBy ? ` · ${b.createdBy}` : ''}`}>
                <View style={{ flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', justifyContent: 'space-between', gap: space.s1 }}>
                  <Badge label={s.label} tone={s.tone} icon={s.icon} />
                  {b.state === 'done' ? (
                    <Button label="Open board" accessibilityLabel={`Open the review board of ${b.label}`} href={`/studies/${studyId}/board/${b.id}`} />
                  ) : (
                    <Text variant="caption">The board opens when the batch is done.</Text>
                  )}
                </View>
              </Card>
            </View>
          );
        })}
      </View>
    </Screen>
  );
}
