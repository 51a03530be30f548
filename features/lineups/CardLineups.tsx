/**
 * The lineups of one board card: each with its result (x of K reviewers found the observed wave and
 * the binomial p-value), a way to take it (or see its answer once taken), and for a lead an invitation
 * to the whole team. Anyone who may review can start a new lineup of the card.
 */
import { useRouter } from 'expo-router';
import { useState } from 'react';
import { View } from 'react-native';
import { messageOf } from '../api/client';
import { useSession } from '../auth/session';
import { useTeam } from '../team/queries';
import { Banner } from '../ui/Banner';
import { Button, ButtonRow } from '../ui/Button';
import { Text } from '../ui/Text';
import { space } from '../ui/tokens';
import { LineupResultView } from './LineupResultView';
import { useBatchLineups, useLineupMutations } from './queries';

export function CardLineups({ studyId, batchId, statistic, period, canReview, isLead, cardName }: {
  studyId: number;
  batchId: number;
  statistic: string;
  period: number;
  canReview: boolean;
  isLead: boolean;
  cardName: string;
}) {
  const lineups = useBatchLineups(studyId, batchId);
  const team = useTeam(isLead ? studyId : null);
  const { user } = useSession();
  const mutations = useLineupMutations(studyId, batchId);
  const router = useRouter();
  const [busy, setBusy] = useState(false);
  const [note, setNote] = useState<{ tone: 'success' | 'caution'; text: string } | null>(null);
  const mine = (lineups.data?.lineups ?? []).filter((l) => l.statistic === statistic && l.period === period);
  const base = `/studies/${studyId}/board/${batchId}/lineups`;

  return (
    <View style={{ gap: space.s1 }} testID={`lineups-${statistic}-${period}`}>
      <Text variant="label">Lineup test</Text>
      {mine.length === 0 ? <Text variant="caption">No lineup yet: hide the observed wave among simulated ones and see whether people can find it.</Text> : null}
      {mine.map((l, k) => (
        <View key={l.id} style={{ gap: space.half }} testID={`lineup-summary-${l.id}`}>
          <Text variant="small">{`Lineup ${k + 1} · ${l.panels} panels · by ${l.createdBy ?? 'a former member'}`}</Text>
          <LineupResultView result={l.result} />
          <ButtonRow>
            <Button
              label={l.picked ? 'See the answer' : 'Take the lineup'}
              accessibilityLabel={`${l.picked ? 'See the answer of' : 'Take'} lineup ${k + 1} of ${cardName}`}
              variant="secondary"
              href={`${base}/${l.id}`}
            />
            {isLead ? (
              <Button
                label="Invite the team"
                accessibilityLabel={`Invite the team to lineup ${k + 1} of ${cardName}`}
                variant="quiet"
                icon="mail"
                loading={busy}
                onPress={async () => {
                  const others = (team.data?.members ?? []).map((m) => m.userId).filter((id) => id !== user?.id);
                  if (!others.length) return setNote({ tone: 'caution', text: 'There is nobody else on the team to invite.' });
                  setBusy(true);
                  try {
                    const r = await mutations.invite(l.id, others);
                    setNote({
                      tone: 'success',
                      text: `Invited ${r.invited.length} member${r.invited.length === 1 ? '' : 's'} by e-mail${r.alreadyPicked.length ? `; ${r.alreadyPicked.length} had taken it already` : ''}.`,
                    });
                  } catch (e) {
                    setNote({ tone: 'caution', text: messageOf(e) });
                  } finally {
                    setBusy(false);
                  }
                }}
              />
            ) : null}
          </ButtonRow>
        </View>
      ))}
      {note ? <Banner tone={note.tone}>{note.text}</Banner> : null}
      {canReview ? (
        <ButtonRow>
          <Button
            label="Start a lineup"
            accessibilityLabel={`Start a lineup of ${cardName}`}
            variant="quiet"
            loading={busy}
            onPress={async () => {
              setBusy(true);
              try {
                const l = await mutations.create({ statistic: statistic as never, period });
                router.push(`${base}/${l.id}`);
              } catch (e) {
                setNote({ tone: 'caution', text: messageOf(e) });
              } finally {
                setBusy(false);
              }
            }}
          />
        </ButtonRow>
      ) : null}
    </View>
  );
}
