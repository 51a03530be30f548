import { useLocalSearchParams } from 'expo-router';
import { View } from 'react-native';
import { can } from '../../shared/api';
import { roleDescriptions, roleLabel, roleTones } from '../team/roles';
import { Badge } from '../ui/Badge';
import { Button } from '../ui/Button';
import { Card } from '../ui/Card';
import { formatDate } from '../ui/format';
import { Loading, LoadError } from '../ui/Loading';
import { Screen } from '../ui/Screen';
import { Text } from '../ui/Text';
import { TextLink } from '../ui/TextLink';
import { colors } from '../ui/theme';
import { space } from '../ui/tokens';
import { useBreakpoint } from '../ui/useBreakpoint';
import { parseStudyId, useStudy } from './queries';
import { StudyNotFound } from './StudyNotFound';

/** The parts of a study, each with a line of what it is for and links to its screens. */
const plannedSections = [
  { key: 'data', title: 'Data', what: 'Upload the waves, actors and covariates of the network.' },
  { key: 'models', title: 'Models', what: 'Choose effects and fit a model by the method of moments.' },
  { key: 'batches', title: 'Batches', what: 'Simulate a fitted model many times and compare with the next wave.' },
  { key: 'refits', title: 'Re-fit studies', what: 'Simulate from fitted models and fit them again: bias, spread and coverage of the estimates.' },
  { key: 'board', title: 'Review board', what: 'Give each auxiliary statistic a verdict together, then sign off the report.' },
];

function Figure({ label, value }: { label: string; value: number }) {
  return (
    <View style={{ minWidth: 80, gap: 2 }}>
      <Text variant="figureLarge">{value}</Text>
      <Text variant="caption">{label}</Text>
    </View>
  );
}

export function StudyOverviewScreen() {
  const params = useLocalSearchParams<{ studyId: string }>();
  const studyId = parseStudyId(params.studyId);
  const { data, error, isLoading, mutate } = useStudy(studyId);
  const { compact } = useBreakpoint();

  if (studyId === null || error?.status === 404 || error?.status === 403) return <StudyNotFound />;
  const study = data?.study;

  return (
    <Screen
      overline="Study"
      title={study?.name ?? 'Study'}
      subtitle={study ? `Updated ${formatDate(study.updatedAt)}` : undefined}
      above={<TextLink href="/">← All studies</TextLink>}
      actions={study ? <Button label="Team" icon="team" variant="secondary" href={`/studies/${study.id}/team`} /> : undefined}
    >
      {error ? <LoadError message={error.message} onRetry={() => void mutate()} /> : null}
      {isLoading && !study ? <Loading label="Loading the study…" /> : null}
      {study ? (
        <>
          <Card>
            {study.description ? <Text variant="lead">{study.description}</Text> : <Text variant="muted">No description yet.</Text>}
            <View style={{ flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', gap: space.s1 }}>
              <Text variant="label">Your role</Text>
              <Badge label={roleLabel(study.myRole)} tone={study.myRole ? roleTones[study.myRole] : 'neutral'} />
              {study.myRole ? (
                <Text variant="caption" style={compact ? { width: '100%' } : null}>
                  {compact ? '' : '— '}
                  {compact ? roleDescriptions[study.myRole].replace(/^./, (c) => c.toUpperCase()) : roleDescriptions[study.myRole]}.
                </Text>
              ) : null}
            </View>
            <View
              style={{ flexDirection: 'row', flexWrap: 'wrap', gap: compact ? space.s3 : space.s4, borderTopWidth: 1, borderTopColor: colors.rule, paddingTop: space.s2 }}
              accessibilityLabel={`${study.memberCount} members, ${study.waveCount} waves, ${study.actorCount} actors`}
            >
              <Figure label="Members" value={study.memberCount} />
              <Figure label="Waves" value={study.waveCount} />
              <Figure label="Actors" value={study.actorCount} />
            </View>
            {can(study.myRole, 'manageTeam') ? null : (
              <Text variant="caption">Only the study lead can change the team or the study's details.</Text>
            )}
          </Card>
          <View style={{ flexDirection: compact ? 'column' : 'row', flexWrap: 'wrap', gap: space.s2 }}>
            {plannedSections.map((s) => (
              <Card
                key={s.key}
                testID={`section-${s.key}`}
                style={{ flexBasis: compact ? 'auto' : '47%', flexGrow: 1 }}
                title={s.title}
              >
                <Text variant="muted">{s.what}</Text>
                {s.key === 'data' ? (
                  <View style={{ gap: space.half }} testID="data-card-links">
                    <Text variant="caption">
                      {study.waveCount > 0 ? `${study.waveCount} waves of ${study.actorCount} actors stored.` : 'No data stored yet.'}
                    </Text>
                    <View style={{ flexDirection: 'row', flexWrap: 'wrap', gap: space.s2 }}>
                      <TextLink href={`/studies/${study.id}/data`}>{study.waveCount > 0 ? 'Open the waves' : 'Open the data'}</TextLink>
                      {can(study.myRole, 'editData') ? <TextLink href={`/studies/${study.id}/data/upload`}>Upload data</TextLink> : null}
                    </View>
                  </View>
                ) : s.key === 'batches' ? (
                  <TextLink href={`/studies/${study.id}/batches`}>Open the batches</TextLink>
                ) : s.key === 'models' ? (
                  <TextLink href={`/studies/${study.id}/models`}>Open the models</TextLink>
                ) : s.key === 'refits' ? (
                  <TextLink href={`/studies/${study.id}/refits`}>Open the re-fit studies</TextLink>
                ) : (
                  <TextLink href={`/studies/${study.id}/board`}>Open the review board</TextLink>
                )}
              </Card>
            ))}
          </View>
        </>
      ) : null}
    </Screen>
  );
}
