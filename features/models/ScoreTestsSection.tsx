/**
 * "Effects that might improve the fit": the score-type tests of every catalogue effect the model leaves
 * out (Schweinberger 2012), ranked by p-value, in plain words, with one action to save the extended
 * model. Run on request, because the server simulates the model at the estimates first.
 */
import { useRouter } from 'expo-router';
import { useState } from 'react';
import { View } from 'react-native';
import useSWR from 'swr';
import type { ScoreTestsResponse } from '../../shared/scoreTests';
import type { ApiError } from '../api/client';
import { messageOf } from '../api/client';
import { Banner } from '../ui/Banner';
import { Button, ButtonRow } from '../ui/Button';
import { Card } from '../ui/Card';
import { Loading, LoadError } from '../ui/Loading';
import { Section } from '../ui/Screen';
import { Text } from '../ui/Text';
import { space } from '../ui/tokens';
import { useModelMutations } from './queries';

export function ScoreTestsSection({ studyId, modelId, fitId, mayEdit }: { studyId: number; modelId: number; fitId: number; mayEdit: boolean }) {
  const [asked, setAsked] = useState(false);
  const tests = useSWR<ScoreTestsResponse, ApiError>(asked ? `/studies/${studyId}/models/${modelId}/fits/${fitId}/score-tests` : null, { revalidateOnFocus: false });
  const { create } = useModelMutations(studyId);
  const router = useRouter();
  const [busy, setBusy] = useState<string | null>(null);
  const [error, setError] = useState<string | null>(null);
  const t = tests.data;

  return (
    <Section
      title="Effects that might improve the fit"
      description="For each effect the model leaves out: would adding it help? A score-type test at these estimates, without re-fitting."
    >
      <Card testID="score-tests">
        {!asked ? (
          <ButtonRow>
            <Button label="Test the left-out effects" variant="secondary" onPress={() => setAsked(true)} />
          </ButtonRow>
        ) : null}
        {tests.isLoading ? <Loading label="Simulating the model at its estimates…" /> : null}
        {tests.error ? <LoadError message={tests.error.message} onRetry={() => void tests.mutate()} /> : null}
        {t ? (
          <View style={{ gap: space.s1 }}>
            {/* The caution first: it says how far to trust the list below (hand-entered values, no convergence). */}
            {t.caution ? <Banner tone="caution">{t.caution}</Banner> : null}
          <View role="list" accessibilityLabel="Left-out effects, most promising first" style={{ gap: space.s1 }}>
            {t.candidates.map((c, k) => (
              <View role="listitem" key={c.key} style={{ gap: space.half }} testID={`score-test-${c.key}`}>
                <Text variant={c.pValue < 0.05 ? 'bodyStrong' : 'body'}>{`${k + 1}. ${c.sentence}`}</Text>
                <Text variant="caption">{`test statistic ${c.statistic.toFixed(2)} (chi-square, 1 df), one-step estimate ${c.oneStep.toFixed(2)}`}</Text>
                {mayEdit && c.pValue < 0.1 ? (
                  <ButtonRow>
                    <Button
                      label="Create the extended model"
                      accessibilityLabel={`Create the model with ${c.label.toLowerCase()} added`}
                      variant="quiet"
                      loading={busy === c.key}
                      onPress={async () => {
                        setBusy(c.key);
                        setError(null);
                        try {
                          const m = await create(c.extendedModel);
                          router.push(`/studies/${studyId}/models/${m.id}`);
                        } catch (e) {
                          setError(messageOf(e));
                        } finally {
                          setBusy(null);
                        }
                      }}
                    />
                  </ButtonRow>
                ) : null}
              </View>
            ))}
            {t.skipped.length ? <Text variant="caption">{`Not tested: ${t.skipped.map((s) => `${s.label} (${s.reason})`).join('; ')}`}</Text> : null}
            {error ? <Banner tone="error">{error}</Banner> : null}
          </View>
          </View>
        ) : null}
      </Card>
    </Section>
  );
}
