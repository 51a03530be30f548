/** A card's comment thread (read by every member; written by members with the review ability) and its verdict history. */
import { useState } from 'react';
import { View } from 'react-native';
import { VERDICT_WORDS } from '../../shared/review';
import { messageOf } from '../api/client';
import { Banner } from '../ui/Banner';
import { Button } from '../ui/Button';
import { formatDate } from '../ui/format';
import { Loading, LoadError } from '../ui/Loading';
import { Text } from '../ui/Text';
import { TextField } from '../ui/TextField';
import { colors } from '../ui/theme';
import { space } from '../ui/tokens';
import { useComments, useHistory } from './queries';

const time = (iso: string) => `${formatDate(iso)}, ${new Date(iso).toISOString().slice(11, 16)} UTC`;

export function CommentThread(props: {
  studyId: number;
  batchId: number;
  statistic: string;
  period: number;
  cardName: string;
  canReview: boolean;
  add: (body: string) => Promise<unknown>;
}) {
  const { data, error, isLoading, mutate } = useComments(props.studyId, props.batchId, props.statistic, props.period, true);
  const [body, setBody] = useState('');
  const [busy, setBusy] = useState(false);
  const [problem, setProblem] = useState<string | null>(null);
  const send = async () => {
    if (!body.trim() || busy) {
      setProblem(body.trim() ? null : 'Write a comment first.');
      return;
    }
    setBusy(true);
    setProblem(null);
    try {
      await props.add(body.trim());
      setBody('');
    } catch (e) {
      setProblem(messageOf(e));
    } finally {
      setBusy(false);
    }
  };
  return (
    <View style={{ gap: space.s1 }}>
      {error ? <LoadError message={error.message} onRetry={() => void mutate()} /> : null}
      {isLoading ? <Loading label="Loading comments…" /> : null}
      <View role="list" accessibilityLabel={`Comments on ${props.cardName}`} style={{ gap: space.s1 }}>
        {(data?.comments ?? []).map((c) => (
          <View key={c.id} role="listitem" style={{ borderLeftWidth: 3, borderLeftColor: colors.rule, paddingLeft: space.s1 + 4, gap: 2 }}>
            <Text variant="caption">
              <Text variant="label">{c.author?.name ?? 'A former member'}</Text> · {time(c.createdAt)}
            </Text>
            <Text>{c.body}</Text>
          </View>
        ))}
        {data && data.comments.length === 0 ? <Text variant="muted">No comments yet.</Text> : null}
      </View>
      {props.canReview ? (
        <View style={{ gap: space.s1 }}>
          <TextField label="Add a comment" value={body} onChangeText={setBody} multiline maxLength={4000} error={problem ?? undefined} />
          <Button label="Post comment" accessibilityLabel={`Post comment on ${props.cardName}`} variant="secondary" onPress={() => void send()} loading={busy} />
        </View>
      ) : null}
    </View>
  );
}

export function VerdictHistory({ studyId, batchId, statistic, period, cardName }: { studyId: number; batchId: number; statistic: string; period: number; cardName: string }) {
  const { data, error, isLoading, mutate } = useHistory(studyId, batchId, statistic, period, true);
  if (error) return <LoadError message={error.message} onRetry={() => void mutate()} />;
  if (isLoading || !data) return <Loading label="Loading the history…" />;
  if (data.history.length === 0) return <Text variant="muted">No verdict has been recorded yet.</Text>;
  return (
    <View role="list" accessibilityLabel={`Verdict history of ${cardName}`} style={{ gap: space.s1 }}>
      {data.history.map((h) => (
        <View key={h.version} role="listitem" style={{ gap: 2 }}>
          <Text variant="caption">
            <Text variant="label">Version {h.version}</Text> · {h.by?.name ?? 'A former member'} · {time(h.at)}
          </Text>
          <Text variant="small">
            {h.previousVerdict ? `${VERDICT_WORDS[h.previousVerdict]} → ${VERDICT_WORDS[h.verdict]}` : `First verdict: ${VERDICT_WORDS[h.verdict]}`}
            {h.note !== (h.previousNote ?? '') && h.note ? ` · note: “${h.note}”` : ''}
            {h.previousNote && h.note !== h.previousNote && !h.note ? ' · note removed' : ''}
          </Text>
        </View>
      ))}
    </View>
  );
}

export function ErrorBanner({ message }: { message: string | null }) {
  return message ? <Banner tone="error">{message}</Banner> : null;
}
