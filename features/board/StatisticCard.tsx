/**
 * One card of the board: a statistic in one period. The envelope chart, the p-value with its reading
 * in plain words, the caution the API gives (few chains, a fitted statistic), the team's verdict (word
 * and icon) with the editor for members who may review, and the comment thread and history.
 */
import { useState } from 'react';
import { View } from 'react-native';
import { formatPValue, pValueWords, type BoardCard, type Verdict } from '../../shared/review';
import { Banner } from '../ui/Banner';
import { Button, ButtonRow } from '../ui/Button';
import { Card } from '../ui/Card';
import { formatDate } from '../ui/format';
import { Icon } from '../ui/icons';
import { Loading, LoadError } from '../ui/Loading';
import { Text } from '../ui/Text';
import { colors } from '../ui/theme';
import { space } from '../ui/tokens';
import { CardLineups } from '../lineups/CardLineups';
import { CommentThread, VerdictHistory } from './CardThread';
import { EnvelopeChart, EnvelopeLegend } from './EnvelopeChart';
import { useBoardMutations, useChart } from './queries';
import { VerdictBadge } from './verdictWords';
import { VerdictEditor } from './VerdictEditor';

export function periodName(period: number, waves?: string[]): string {
  const from = waves?.[period - 1];
  const to = waves?.[period];
  return from && to ? `period ${period} (${from} to ${to})` : `period ${period}`;
}

export function StatisticCard({ studyId, batchId, card, canReview, isLead = false, waves }: { studyId: number; batchId: number; card: BoardCard; canReview: boolean; isLead?: boolean; waves?: string[] }) {
  const chart = useChart(studyId, batchId, card.statistic, card.period);
  const mutations = useBoardMutations(studyId, batchId);
  const [open, setOpen] = useState<'none' | 'comments' | 'history'>('none');
  const cardName = `${card.label}, period ${card.period}`;
  const c = chart.data;
  const words = c ? pValueWords(c.pValue) : null;
  const pTone = c ? (c.pValue < 0.05 ? 'fail' : c.pValue < 0.1 ? 'unsure' : 'pass') : 'pass';
  const pIcon = pTone === 'fail' ? 'fail' : pTone === 'unsure' ? 'unsure' : 'pass';

  return (
    <Card
      testID={`card-${card.statistic}-${card.period}`}
      accessibilityLabel={cardName}
      title={card.label}
      subtitle={periodName(card.period, waves)}
      actions={<VerdictBadge verdict={card.verdict?.verdict ?? null} testID={`verdict-${card.statistic}-${card.period}`} />}
    >
      {chart.error ? <LoadError message={chart.error.message} onRetry={() => void chart.mutate()} /> : null}
      {chart.isLoading ? <Loading label="Drawing the envelopes…" /> : null}
      {c ? (
        <>
          <EnvelopeChart chart={c} />
          <EnvelopeLegend chart={c} />
          <View style={{ gap: space.half }}>
            <View style={{ flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', gap: space.s1 }}>
              <Icon name={pIcon} size={20} color={colors[pTone]} />
              <Text variant="bodyStrong" style={{ color: colors[pTone] }}>
                {words!.short}
              </Text>
              <Text variant="figure" accessibilityLabel={`p-value ${formatPValue(c.pValue)}`}>
                p = {formatPValue(c.pValue)}
              </Text>
            </View>
            <Text>{words!.sentence}</Text>
            <Text variant="muted">{c.reading}</Text>
          </View>
          {c.caution ? <Banner tone="caution">{c.caution}</Banner> : null}
        </>
      ) : null}
      {card.verdict ? (
        <Text variant="caption">
          {`Verdict by ${card.verdict.updatedBy?.name ?? 'a former member'}, ${formatDate(card.verdict.updatedAt)} (version ${card.verdict.version})`}
          {card.verdict.note ? ` — “${card.verdict.note}”` : ''}
        </Text>
      ) : null}
      <VerdictEditor
        cardName={cardName}
        current={card.verdict}
        canReview={canReview}
        save={(verdict: Verdict, note: string, version: number) => mutations.saveVerdict({ statistic: card.statistic, period: card.period }, verdict, note, version)}
      />
      <CardLineups studyId={studyId} batchId={batchId} statistic={card.statistic} period={card.period} canReview={canReview} isLead={isLead} cardName={cardName} />
      <ButtonRow>
        <Button
          label={`Comments (${card.comments})`}
          accessibilityLabel={`${open === 'comments' ? 'Hide' : 'Show'} comments on ${cardName} (${card.comments})`}
          variant="quiet"
          icon="mail"
          onPress={() => setOpen(open === 'comments' ? 'none' : 'comments')}
        />
        <Button
          label="History"
          accessibilityLabel={`${open === 'history' ? 'Hide' : 'Show'} the verdict history of ${cardName}`}
          variant="quiet"
          onPress={() => setOpen(open === 'history' ? 'none' : 'history')}
        />
      </ButtonRow>
      {open === 'comments' ? (
        <CommentThread
          studyId={studyId}
          batchId={batchId}
          statistic={card.statistic}
          period={card.period}
          cardName={cardName}
          canReview={canReview}
          add={(body) => mutations.addComment({ statistic: card.statistic, period: card.period }, body)}
        />
      ) : null}
      {open === 'history' ? <VerdictHistory studyId={studyId} batchId={batchId} statistic={card.statistic} period={card.period} cardName={cardName} /> : null}
    </Card>
  );
}
