/** "What awaits me": the open review requests of the signed-in user, across studies, with progress. */
import { View } from 'react-native';
import { Button } from '../ui/Button';
import { Card } from '../ui/Card';
import { EmptyState } from '../ui/EmptyState';
import { formatDate } from '../ui/format';
import { Loading, LoadError } from '../ui/Loading';
import { Screen } from '../ui/Screen';
import { Text } from '../ui/Text';
import { colors } from '../ui/theme';
import { radius, space } from '../ui/tokens';
import { useInbox } from './queries';

function Progress({ done, total }: { done: number; total: number }) {
  const share = total > 0 ? done / total : 0;
  return (
    <View style={{ gap: space.half }}>
      <View
        role="progressbar"
        aria-valuemin={0}
        aria-valuemax={total}
        aria-valuenow={done}
        accessibilityLabel={`${done} of ${total} statistics have a verdict`}
        style={{ height: 8, borderRadius: radius.pill, backgroundColor: colors.surfaceSunk, overflow: 'hidden' }}
      >
        <View style={{ width: `${Math.round(share * 100)}%`, height: 8, backgroundColor: colors.accent }} />
      </View>
      <Text variant="caption">{`${done} of ${total} statistics have a verdict`}</Text>
    </View>
  );
}

export function InboxScreen() {
  const inbox = useInbox();
  const items = inbox.data?.items ?? [];
  return (
    <Screen title="Inbox" subtitle="Reviews a lead asked you for.">
      {inbox.error ? <LoadError message={inbox.error.message} onRetry={() => void inbox.mutate()} /> : null}
      {inbox.isLoading ? <Loading label="Loading your inbox…" /> : null}
      {inbox.data && items.length === 0 ? <EmptyState title="Nothing awaits you" message="When a lead asks you to review a batch, it appears here and you get an e-mail." /> : null}
      <View role="list" accessibilityLabel="Reviews awaiting you" style={{ gap: space.s2 }}>
        {items.map((it) => (
          <View role="listitem" key={it.request.id}>
            <Card title={it.batchLabel} subtitle={`${it.studyName} · asked by ${it.request.requestedBy?.name ?? 'a lead'} on ${formatDate(it.request.createdAt)}`}>
              {it.request.message ? <Text>{`“${it.request.message}”`}</Text> : null}
              <Progress done={it.reviewed} total={it.total} />
              <Button
                label="Start reviewing"
                accessibilityLabel={`Review ${it.batchLabel} in ${it.studyName}`}
                href={`/studies/${it.request.studyId}/board/${it.request.batchId}`}
              />
            </Card>
          </View>
        ))}
      </View>
    </Screen>
  );
}
