/**
 * The review board of one batch: the summary strip (pass / fail / unsure / awaiting review), one card
 * per auxiliary statistic and period with its envelopes, p-value, verdict and thread; for a lead, the
 * panel to ask named team members for a review; for someone asked, the note that it awaits them.
 */
import { useLocalSearchParams } from 'expo-router';
import { useState } from 'react';
import { View } from 'react-native';
import { can } from '../../shared/api';
import { messageOf } from '../api/client';
import { useSession } from '../auth/session';
import { Checkbox } from '../ui/Checkbox';
import { useBatch } from '../batches/queries';
import { parseStudyId, useStudy, useStudyData } from '../studies/queries';
import { StudyNotFound } from '../studies/StudyNotFound';
import { useTeam } from '../team/queries';
import { Banner } from '../ui/Banner';
import { Button, ButtonRow } from '../ui/Button';
import { Card } from '../ui/Card';
import { EmptyState } from '../ui/EmptyState';
import { formatDate } from '../ui/format';
import { Loading, LoadError } from '../ui/Loading';
import { Screen, Section } from '../ui/Screen';
import { SegmentedControl } from '../ui/SegmentedControl';
import { Text } from '../ui/Text';
import { TextField } from '../ui/TextField';
import { TextLink } from '../ui/TextLink';
import { space } from '../ui/tokens';
import { useBreakpoint } from '../ui/useBreakpoint';
import { parseId } from '../api/params';
import { useBoard, useBoardMutations } from './queries';
import { StatisticCard } from './StatisticCard';
import { SummaryStrip } from './SummaryStrip';

function RequestReviewPanel({ studyId, batchId }: { studyId: number; batchId: number }) {
  const team = useTeam(studyId);
  const board = useBoard(studyId, batchId);
  const mutations = useBoardMutations(studyId, batchId);
  const { user } = useSession();
  const [chosen, setChosen] = useState<number[]>([]);
  const [message, setMessage] = useState('');
  const [busy, setBusy] = useState(false);
  const [result, setResult] = useState<string | null>(null);
  const [error, setError] = useState<string | null>(null);
  const members = (team.data?.members ?? []).filter((m) => m.userId !== user?.id);
  const open = (board.data?.requests ?? []).filter((r) => r.completedAt === null);
  const send = async () => {
    if (chosen.length === 0) {
      setError('Choose at least one team member to ask.');
      return;
    }
    setBusy(true);
    setError(null);
    setResult(null);
    try {
      const res = await mutations.requestReview(chosen, message.trim());
      const names = (ids: number[]) => members.filter((m) => ids.includes(m.userId)).map((m) => m.name).join(', ');
      setResult(
        [res.asked.length ? `Asked ${names(res.asked)}; they get an e-mail (unless they turned review e-mails off) and see it in their inbox.` : '', res.alreadyAsked.length ? `${names(res.alreadyAsked)} had been asked already.` : '']
          .filter(Boolean)
          .join(' '),
      );
      setChosen([]);
      setMessage('');
    } catch (e) {
      setError(messageOf(e));
    } finally {
      setBusy(false);
    }
  };
  return (
    <Card title="Ask for a review" subtitle="Named members get an e-mail and find the batch in their inbox.">
      {team.error ? <LoadError message={team.error.message} onRetry={() => void team.mutate()} /> : null}
      <View role="group" accessibilityLabel="Team members to ask" style={{ gap: 0 }}>
        {members.map((m) => (
          <Checkbox
            key={m.userId}
            label={m.name}
            hint={`${m.role}${open.some((r) => r.reviewer.id === m.userId) ? ' · asked, review open' : ''}`}
            checked={chosen.includes(m.userId)}
            onChange={(on) => setChosen((c) => (on ? [...c, m.userId] : c.filter((id) => id !== m.userId)))}
          />
        ))}
      </View>
      <TextField label="Message (optional)" value={message} onChangeText={setMessage} multiline maxLength={1000} />
      {error ? <Banner tone="error">{error}</Banner> : null}
      {result ? <Banner tone="success">{result}</Banner> : null}
      <Button label="Ask for review" icon="mail" onPress={() => void send()} loading={busy} />
      {board.data && board.data.requests.length > 0 ? (
        <View style={{ gap: space.half }}>
          <Text variant="label">Asked so far</Text>
          {board.data.requests.map((r) => (
            <Text key={r.id} variant="small">
              {`${r.reviewer.name}, asked ${formatDate(r.createdAt)} by ${r.requestedBy?.name ?? 'a former member'}: ${r.completedAt ? `done ${formatDate(r.completedAt)}` : 'open'}`}
            </Text>
          ))}
        </View>
      ) : null}
    </Card>
  );
}

export function BoardScreen() {
  const params = useLocalSearchParams<{ studyId: string; batchId: string }>();
  const studyId = parseStudyId(params.studyId);
  const batchId = parseId(params.batchId);
  const study = useStudy(studyId);
  const batch = useBatch(studyId, batchId);
  const board = useBoard(studyId, batch.data?.batch.state === 'done' ? batchId : null);
  const data = useStudyData(studyId);
  const { user } = useSession();
  const { breakpoint } = useBreakpoint();
  const [period, setPeriod] = useState<string>('all');
  const mutations = useBoardMutations(studyId ?? 0, batchId ?? 0);
  const [completing, setCompleting] = useState(false);

  if (studyId === null || batchId === null || study.error?.status === 404 || batch.error?.status === 404) return <StudyNotFound />;
  const role = study.data?.study.myRole ?? null;
  const canReview = !!user?.isAdmin || can(role, 'review');
  const isLead = !!user?.isAdmin || can(role, 'manageTeam');
  const b = batch.data?.batch;
  const waves = data.data?.waves.map((w) => w.label);
  const cards = (board.data?.cards ?? []).filter((c) => period === 'all' || String(c.period) === period);
  const mine = (board.data?.requests ?? []).find((r) => r.reviewer.id === user?.id && r.completedAt === null);
  const base = `/studies/${studyId}`;

  return (
    <Screen
      overline="Review board"
      title={b?.label ?? 'Review board'}
      subtitle={b ? `${b.chains} chains per period · seed ${b.seed} · ${study.data?.study.name ?? ''}` : undefined}
      above={<TextLink href={`${base}/board`}>← All batches to review</TextLink>}
      actions={
        b?.state === 'done' ? (
          <>
            <Button label="Consensus network" variant="secondary" href={`${base}/board/${batchId}/consensus`} />
            <Button label="Compare models" variant="secondary" href={`${base}/compare?batches=${batchId}`} />
            <Button label="Fit report" variant="secondary" href={`${base}/report?batch=${batchId}`} />
          </>
        ) : undefined
      }
    >
      {batch.error ? <LoadError message={batch.error.message} onRetry={() => void batch.mutate()} /> : null}
      {batch.isLoading ? <Loading label="Loading the batch…" /> : null}
      {b && b.state !== 'done' ? (
        <EmptyState
          title={b.state === 'running' || b.state === 'queued' ? 'This batch is still running' : `This batch ${b.state}`}
          message={b.state === 'running' || b.state === 'queued' ? 'The board opens when every chain has finished.' : 'Only a finished batch can be reviewed.'}
          action={<Button label="See the batch" variant="secondary" href={`${base}/batches/${batchId}`} />}
        />
      ) : null}
      {board.error ? <LoadError message={board.error.message} onRetry={() => void board.mutate()} /> : null}
      {board.data ? (
        <>
          <SummaryStrip counts={board.data.counts} />
          {board.data.signoff ? (
            <Banner tone="success" word="Signed off">
              {`${board.data.signoff.signedBy?.name ?? 'A former member'} signed off the report on ${formatDate(board.data.signoff.signedAt)}.`}
            </Banner>
          ) : null}
          {mine ? (
            <Banner
              tone="info"
              word="Awaiting your review"
              action={
                <ButtonRow>
                  <Button
                    label="Mark my review done"
                    variant="secondary"
                    loading={completing}
                    onPress={async () => {
                      setCompleting(true);
                      try {
                        await mutations.completeRequest(mine.id);
                      } finally {
                        setCompleting(false);
                      }
                    }}
                  />
                </ButtonRow>
              }
            >
              {`${mine.requestedBy?.name ?? 'A lead'} asked you on ${formatDate(mine.createdAt)}.${mine.message ? ` “${mine.message}”` : ''}`}
            </Banner>
          ) : null}
          {isLead ? <RequestReviewPanel studyId={studyId} batchId={batchId} /> : null}
          <Section title="Statistics" description="Each card compares the observed end wave with the simulated ones. Give each a verdict: pass, fail or unsure.">
            {board.data.periods.length > 1 ? (
              <SegmentedControl
                label="Show period"
                options={[{ value: 'all', label: 'All' }, ...board.data.periods.map((p) => ({ value: String(p), label: `Period ${p}`, description: waves ? `${waves[p - 1]} to ${waves[p]}` : undefined }))]}
                value={period}
                onChange={setPeriod}
              />
            ) : null}
            <View style={{ flexDirection: breakpoint === 'wide' ? 'row' : 'column', flexWrap: 'wrap', gap: space.s2 }}>
              {cards.map((card) => (
                <View key={`${card.statistic}-${card.period}`} style={breakpoint === 'wide' ? { flexBasis: '48%', flexGrow: 1, minWidth: 0 } : undefined}>
                  <StatisticCard studyId={studyId} batchId={batchId} card={card} canReview={canReview} isLead={isLead} waves={waves} />
                </View>
              ))}
            </View>
          </Section>
        </>
      ) : board.isLoading ? (
        <Loading label="Loading the board…" />
      ) : null}
    </Screen>
  );
}
