/**
 * Taking a lineup: m small charts of one statistic drawn alike, one of them the observed wave and the
 * others simulated from the model, in an order fixed by the lineup's seed. The reviewer picks the one
 * that looks different and says why in a few words; only then the answer, everyone's picks and the
 * lineup's result (the binomial p-value) are shown.
 */
import { useLocalSearchParams } from 'expo-router';
import { useState } from 'react';
import { View } from 'react-native';
import { messageOf } from '../api/client';
import { parseId } from '../api/params';
import { parseStudyId, useStudy } from '../studies/queries';
import { StudyNotFound } from '../studies/StudyNotFound';
import { Banner } from '../ui/Banner';
import { Button, ButtonRow } from '../ui/Button';
import { Card } from '../ui/Card';
import { Loading, LoadError } from '../ui/Loading';
import { Screen } from '../ui/Screen';
import { Text } from '../ui/Text';
import { TextField } from '../ui/TextField';
import { TextLink } from '../ui/TextLink';
import { space } from '../ui/tokens';
import { useBreakpoint } from '../ui/useBreakpoint';
import { LineupPanel } from './LineupPanel';
import { LineupResultView } from './LineupResultView';
import { useLineup, useLineupMutations } from './queries';

export function LineupScreen() {
  const params = useLocalSearchParams<{ studyId: string; batchId: string; lineupId: string }>();
  const studyId = parseStudyId(params.studyId);
  const batchId = parseId(params.batchId);
  const lineupId = parseId(params.lineupId);
  const study = useStudy(studyId);
  const lineup = useLineup(studyId, lineupId);
  const mutations = useLineupMutations(studyId ?? 0, batchId ?? 0);
  const { width, compact, gutter } = useBreakpoint();
  const [selected, setSelected] = useState<number | null>(null);
  const [reason, setReason] = useState('');
  const [error, setError] = useState<string | null>(null);
  const [saving, setSaving] = useState(false);

  if (studyId === null || batchId === null || lineupId === null || study.error?.status === 404 || lineup.error?.status === 404) return <StudyNotFound />;
  const d = lineup.data;
  const answer = d?.answer ?? null;
  const columns = compact ? 4 : 5;
  const area = Math.min(width - 2 * gutter, 1100) - (compact ? 0 : 2 * space.s3);
  const gap = compact ? space.half : space.s1;
  const panelWidth = Math.max(60, Math.floor((area - gap * (columns - 1)) / columns) - 1);

  const submit = async () => {
    setError(null);
    if (selected === null) return setError('Pick the panel that looks different first.');
    if (reason.trim().length < 3) return setError('Say in a few words why that panel looks different.');
    setSaving(true);
    try {
      await mutations.pick(lineupId, selected, reason.trim());
    } catch (e) {
      setError(messageOf(e));
    } finally {
      setSaving(false);
    }
  };

  return (
    <Screen
      overline="Lineup test"
      title={d ? `${d.label}, period ${d.period}` : 'Lineup test'}
      subtitle={d ? `${d.batchLabel} · ${d.panels} panels · seed ${d.seed}` : undefined}
      above={<TextLink href={`/studies/${studyId}/board/${batchId}`}>← Review board</TextLink>}
    >
      {lineup.error ? <LoadError message={lineup.error.message} onRetry={() => void lineup.mutate()} /> : null}
      {lineup.isLoading ? <Loading label="Drawing the panels…" /> : null}
      {d ? (
        <>
          {answer ? null : (
            <Text>
              {`One of these ${d.panels} charts of the ${d.label.toLowerCase()} is the observed wave; the others were simulated from the model. All are drawn the same way${
                d.scale === 'standardised' ? ' (each value standardised by the simulations, so zero is the simulated average)' : ''
              }. Which one looks different? Decide on your own, before looking at this statistic on the board.`}
            </Text>
          )}
          <View
            role="radiogroup"
            accessibilityLabel={`${d.panels} panels`}
            testID="lineup-grid"
            style={{ flexDirection: 'row', flexWrap: 'wrap', gap }}
          >
            {d.panelValues.map((values, k) => (
              <LineupPanel
                key={k}
                number={k + 1}
                values={values}
                yMin={d.yMin}
                yMax={d.yMax}
                width={panelWidth}
                selected={answer ? answer.mine.panel === k + 1 : selected === k + 1}
                disabled={!!answer}
                mark={answer ? (answer.observedPanel === k + 1 ? 'observed' : answer.mine.panel === k + 1 ? 'mine' : null) : null}
                onPress={() => setSelected(k + 1)}
              />
            ))}
          </View>
          {answer ? (
            <Card title="The answer" testID="lineup-answer">
              <Text variant="bodyStrong">
                {answer.mine.correct
                  ? `You found it: panel ${answer.observedPanel} is the observed wave.`
                  : `Panel ${answer.observedPanel} is the observed wave; you picked panel ${answer.mine.panel}.`}
              </Text>
              <Text variant="muted">{`Your reason: “${answer.mine.reason}”`}</Text>
              <LineupResultView result={d.result} />
              <View role="list" accessibilityLabel="Everyone's picks" style={{ gap: 2 }}>
                {answer.picks.map((p, k) => (
                  <Text role="listitem" key={k} variant="small">
                    {`${p.reviewer.name}: panel ${p.panel} (${p.correct ? 'the observed wave' : 'simulated'}) — “${p.reason}”`}
                  </Text>
                ))}
              </View>
            </Card>
          ) : (
            <Card>
              <Text variant="bodyStrong" testID="lineup-choice">{selected === null ? 'No panel picked yet.' : `You picked panel ${selected}.`}</Text>
              <TextField label="Why does it look different?" hint="A few words: what you saw." value={reason} onChangeText={setReason} multiline maxLength={500} />
              {error ? <Banner tone="caution">{error}</Banner> : null}
              <ButtonRow>
                <Button label="Submit my pick" onPress={() => void submit()} loading={saving} block={compact} />
              </ButtonRow>
              <Text variant="caption">You can pick once. The answer is shown after you submit.</Text>
            </Card>
          )}
        </>
      ) : null}
    </Screen>
  );
}
