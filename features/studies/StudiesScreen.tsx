import { View } from 'react-native';
import type { StudySummary } from '../../shared/api';
import { roleLabel, roleTones } from '../team/roles';
import { Badge } from '../ui/Badge';
import { Button } from '../ui/Button';
import { EmptyState } from '../ui/EmptyState';
import { formatDate } from '../ui/format';
import { Loading, LoadError } from '../ui/Loading';
import { Screen } from '../ui/Screen';
import { Table, type Column } from '../ui/Table';
import { Text } from '../ui/Text';
import { TextLink } from '../ui/TextLink';
import { useStudies } from './queries';

const roleOrder = { lead: 0, statistician: 1, reviewer: 2 } as const;

const columns: Column<StudySummary>[] = [
  {
    key: 'name',
    title: 'Name',
    flex: 3,
    sortValue: (s) => s.name,
    render: (s) => (
      <View style={{ gap: 2 }}>
        <TextLink href={`/studies/${s.id}`} accessibilityLabel={`Open study ${s.name}`}>
          {s.name}
        </TextLink>
        {s.description ? (
          <Text variant="caption" numberOfLines={1}>
            {s.description}
          </Text>
        ) : null}
      </View>
    ),
  },
  {
    key: 'role',
    title: 'Your role',
    flex: 1.3,
    sortValue: (s) => (s.myRole ? roleOrder[s.myRole] : 3),
    render: (s) => <Badge label={roleLabel(s.myRole)} tone={s.myRole ? roleTones[s.myRole] : 'neutral'} />,
  },
  {
    key: 'members',
    title: 'Members',
    numeric: true,
    flex: 1,
    sortValue: (s) => s.memberCount,
    firstDirection: 'descending',
    render: (s) => <Text variant="figure">{s.memberCount}</Text>,
  },
  {
    key: 'updated',
    title: 'Updated',
    numeric: true,
    flex: 1.3,
    sortValue: (s) => s.updatedAt,
    firstDirection: 'descending',
    render: (s) => <Text variant="figure">{formatDate(s.updatedAt)}</Text>,
  },
];

export function StudiesScreen() {
  const { data, error, isLoading, mutate } = useStudies();
  const newStudy = <Button label="New study" icon="plus" href="/studies/new" />;
  return (
    <Screen title="Studies" subtitle="The studies you belong to, with your role in each." actions={data?.studies.length ? newStudy : undefined}>
      {error ? <LoadError message={error.message} onRetry={() => void mutate()} /> : null}
      {isLoading && !data ? <Loading label="Loading your studies…" /> : null}
      {data && data.studies.length === 0 ? (
        <EmptyState
          title="No studies yet"
          message="Start a study for your team's panel data, or ask a study lead to invite you to theirs."
          action={newStudy}
        />
      ) : null}
      {data && data.studies.length > 0 ? (
        <Table
          label="Your studies"
          testID="studies-table"
          columns={columns}
          rows={data.studies}
          rowKey={(s) => s.id}
          initialSort={{ key: 'updated', direction: 'descending' }}
        />
      ) : null}
    </Screen>
  );
}
