import { useLocalSearchParams } from 'expo-router';
import { View } from 'react-native';
import { can } from '../../shared/api';
import type { ModelSummary } from '../../shared/models';
import { StaleBadge } from '../data/StaleDataBanner';
import { parseStudyId, useStudy } from '../studies/queries';
import { StudyNotFound } from '../studies/StudyNotFound';
import { Badge } from '../ui/Badge';
import { Button } from '../ui/Button';
import { EmptyState } from '../ui/EmptyState';
import { formatDate, plural } from '../ui/format';
import { Loading, LoadError } from '../ui/Loading';
import { Screen } from '../ui/Screen';
import { Table, type Column } from '../ui/Table';
import { Text } from '../ui/Text';
import { TextLink } from '../ui/TextLink';
import { space } from '../ui/tokens';
import { convergenceWord, fitStateWords } from './format';
import { useModels } from './queries';

function columns(studyId: number): Column<ModelSummary>[] {
  return [
    {
      key: 'name',
      title: 'Model',
      flex: 2,
      sortValue: (m) => m.name.toLowerCase(),
      render: (m) => (
        <View style={{ gap: 2 }}>
          <TextLink href={`/studies/${studyId}/models/${m.id}`} accessibilityLabel={`Open model ${m.name}`}>
            {m.name}
          </TextLink>
          {m.description ? (
            <Text variant="caption" numberOfLines={1}>
              {m.description}
            </Text>
          ) : null}
        </View>
      ),
    },
    {
      key: 'content',
      title: 'Parameters',
      flex: 1.4,
      render: (m) => (
        <Text variant="small">
          {plural(m.effectCount, 'effect')}, period{m.periods.length > 1 ? 's' : ''} {m.periods.join(', ')} · {m.estimatedCount} estimated
        </Text>
      ),
    },
    {
      key: 'fit',
      title: 'Latest fit',
      flex: 1.5,
      sortValue: (m) => m.latestFit?.createdAt ?? '',
      firstDirection: 'descending',
      render: (m) => {
        if (!m.latestFit) return <Text variant="caption">Not fitted yet</Text>;
        const state = fitStateWords[m.latestFit.state];
        const conv = m.latestFit.mode === 'estimate' && m.latestFit.state === 'done' ? convergenceWord(m.latestFit.converged) : null;
        return (
          <View style={{ flexDirection: 'row', flexWrap: 'wrap', gap: space.half }}>
            <Badge label={m.latestFit.mode === 'fixed' ? 'Values entered' : state.label} tone={state.tone} icon={state.icon} />
            {conv ? <Badge label={conv.label} tone={conv.tone} icon={conv.icon} /> : null}
            <StaleBadge studyId={studyId} createdAt={m.latestFit.createdAt} />
          </View>
        );
      },
    },
    {
      key: 'updated',
      title: 'Changed',
      flex: 1,
      sortValue: (m) => m.updatedAt,
      firstDirection: 'descending',
      render: (m) => <Text variant="small">{formatDate(m.updatedAt)}</Text>,
    },
  ];
}

export function ModelListScreen() {
  const params = useLocalSearchParams<{ studyId: string }>();
  const studyId = parseStudyId(params.studyId);
  const study = useStudy(studyId);
  const { data, error, isLoading, mutate } = useModels(studyId);
  if (studyId === null || study.error?.status === 404 || error?.status === 404) return <StudyNotFound />;
  const mayEdit = can(study.data?.study.myRole, 'editModels');
  const models = data?.models ?? [];
  return (
    <Screen
      overline="Models"
      title={study.data?.study.name ?? 'Models'}
      subtitle="A model names the effects that drive the choices of the actors between waves; a fit estimates their strength."
      above={<TextLink href={`/studies/${studyId}`}>← Study overview</TextLink>}
      actions={mayEdit ? <Button label="New model" icon="plus" href={`/studies/${studyId}/models/new`} testID="model-new" /> : undefined}
      testID="model-list"
    >
      {error ? <LoadError message={error.message} onRetry={() => void mutate()} /> : null}
      {isLoading && !data ? <Loading label="Loading the models…" /> : null}
      {data && models.length === 0 ? (
        <EmptyState
          title="No models yet"
          message={
            mayEdit
              ? 'Start with density and reciprocity, then add the effects your questions are about.'
              : 'A lead or statistician of this study can make one; you can read the fits here.'
          }
          action={mayEdit ? <Button label="New model" icon="plus" href={`/studies/${studyId}/models/new`} /> : undefined}
        />
      ) : null}
      {models.length > 0 ? (
        <Table
          label="Models of this study"
          columns={columns(studyId)}
          rows={models}
          rowKey={(m) => m.id}
          initialSort={{ key: 'updated', direction: 'descending' }}
          testID="model-table"
        />
      ) : null}
    </Screen>
  );
}
