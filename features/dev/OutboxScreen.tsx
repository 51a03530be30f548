/**
 * Development only: the messages the server would have e-mailed, with their links made
 * clickable. Invitation links open in this app whatever host the server put in them.
 */
import { View } from 'react-native';
import type { OutboxMessage } from '../../shared/api';
import { Card } from '../ui/Card';
import { EmptyState } from '../ui/EmptyState';
import { formatDate } from '../ui/format';
import { Loading, LoadError } from '../ui/Loading';
import { Screen } from '../ui/Screen';
import { Text } from '../ui/Text';
import { TextLink } from '../ui/TextLink';
import { space } from '../ui/tokens';
import { useOutbox } from './queries';

const urlPattern = /https?:\/\/[^\s<>"')]+/g;

/** The in-app path of a link to this app (invitation links), or null for other links. */
export function inAppPath(url: string): string | null {
  try {
    const u = new URL(url);
    return u.pathname.startsWith('/invite/') ? u.pathname : null;
  } catch {
    return null;
  }
}

function MessageCard({ message }: { message: OutboxMessage }) {
  const links = Array.from(new Set(message.text.match(urlPattern) ?? []));
  return (
    <Card title={message.subject} subtitle={`To ${message.to} · ${formatDate(message.createdAt)}`}>
      <Text variant="small" selectable>
        {message.text}
      </Text>
      {links.length > 0 ? (
        <View style={{ gap: space.half }}>
          {links.map((url) => {
            const path = inAppPath(url);
            return path ? (
              <TextLink key={url} href={path} accessibilityLabel={`Open the invitation for ${message.to}`}>
                Open this invitation
              </TextLink>
            ) : (
              <Text key={url} variant="caption" selectable>
                {url}
              </Text>
            );
          })}
        </View>
      ) : null}
    </Card>
  );
}

export function OutboxScreen() {
  const { data, error, isLoading, mutate } = useOutbox({ poll: true });
  return (
    <Screen title="Outbox" subtitle="Development server only: e-mails Wavefit would have sent, newest first.">
      {error?.status === 404 ? (
        <EmptyState title="No outbox here" message="This server sends real e-mail; the outbox exists only on a development server." />
      ) : error ? (
        <LoadError message={error.message} onRetry={() => void mutate()} />
      ) : null}
      {isLoading && !data ? <Loading label="Loading the outbox…" /> : null}
      {data && data.messages.length === 0 ? <EmptyState title="Nothing sent yet" message="Invitations appear here when a lead sends them." /> : null}
      {data
        ? [...data.messages]
            .sort((a, b) => b.createdAt.localeCompare(a.createdAt) || b.id - a.id)
            .map((m) => <MessageCard key={m.id} message={m} />)
        : null}
    </Screen>
  );
}
