/**
 * Re-fit studies of a Study: the list (state, progress, size) and, for the lead and statisticians, the
 * form that starts one from one to four finished fits (each model's latest finished fit is offered).
 */
import { useLocalSearchParams, useRouter } from 'expo-router';
import { useState } from 'react';
import { View } from 'react-native';
import { can } from '../../shared/api';
import { MAX_REFIT_FITS, MAX_REPLICATIONS, MIN_REPLICATIONS, type RefitSummary } from '../../shared/refits';
import { messageOf } from '../api/client';
import { parseIds } from '../api/params';
import { stateWords, timeLeft } from '../batches/format';
import { ProgressBar } from '../batches/ProgressBar';
import { useModels } from '../models/queries';
import { parseStudyId, useStudy } from '../studies/queries';
import { StudyNotFound } from '../studies/StudyNotFound';
import { Badge } from '../ui/Badge';
import { Banner } from '../ui/Banner';
import { Button, ButtonRow } from '../ui/Button';
import { Card } from '../ui/Card';
import { Checkbox } from '../ui/Checkbox';
import { EmptyState } from '../ui/EmptyState';
import { formatDate } from '../ui/format';
import { Loading, LoadError } from '../ui/Loading';
import { Screen, Section } from '../ui/Screen';
import { Text } from '../ui/Text';
import { TextField } from '../ui/TextField';
import { TextLink } from '../ui/TextLink';
import { space } from '../ui/tokens';
import { useRefitMutations, useRefits } from './queries';

function RefitRow({ studyId, refit }: { studyId: number; refit: RefitSummary }) {
  const state = stateWords[refit.state];
  const active = refit.state === 'queued' || refit.state === 'running';
  return (
    <Card testID={`refit-${refit.id}`}>
      <View style={{ flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', gap: space.s1 }}>
        <Badge label={state.label} tone={state.tone} icon={state.icon} />
        <TextLink href={`/studies/${studyId}/refits/${refit.id}`}>{refit.label}</TextLink>
      </View>
      <Text variant="caption">
        {refit.models.map((m) => m.name).join(' · ')} · {refit.replications} panels each{refit.cross ? ', every model fitted to every model’s panels' : ''} · seed {refit.seed} ·{' '}
        {formatDate(refit.createdAt)}
        {refit.createdBy ? ` by ${refit.createdBy}` : ''}
      </Text>
      {active ? <ProgressBar done={refit.refitsDone} total={refit.refitsTotal} unit="re-fits" caption={refit.state === 'queued' ? 'waiting for a worker' : timeLeft(refit.secondsLeft)} /> : null}
    </Card>
  );
}

function StartForm({ studyId, preselected }: { studyId: number; preselected: number[] }) {
  const models = useModels(studyId);
  const router = useRouter();
  const { create } = useRefitMutations(studyId);
  const fits = (models.data?.models ?? [])
    .filter((m) => m.latestFit && m.latestFit.state === 'done')
    .map((m) => ({ id: m.latestFit!.id, name: m.name, mode: m.latestFit!.mode, converged: m.latestFit!.converged }));
  const [chosen, setChosen] = useState<number[]>(preselected);
  const [replications, setReplications] = useState('100');
  const [seed, setSeed] = useState('');
  const [cross, setCross] = useState(false);
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const R = Number(replications);
  const rError = !/^\d+$/.test(replications) || R < MIN_REPLICATIONS || R > MAX_REPLICATIONS ? `Enter a whole number from ${MIN_REPLICATIONS} to ${MAX_REPLICATIONS}.` : undefined;
  const seedError = seed !== '' && !/^\d+$/.test(seed) ? 'A seed is a whole number (or leave it empty).' : undefined;
  const total = chosen.length * (cross ? chosen.length : 1) * (rError ? 0 : R);

  const start = async () => {
    setBusy(true);
    setError(null);
    try {
      const refit = await create({ fitIds: chosen, replications: R, cross, ...(seed !== '' ? { seed: Number(seed) } : {}) });
      router.push(`/studies/${studyId}/refits/${refit.id}`);
    } catch (e) {
      setError(messageOf(e));
    } finally {
      setBusy(false);
    }
  };

  return (
    <Card
      title="Start a re-fit study"
      subtitle="Simulate new panels from each chosen fit, from the observed first wave, and fit the model again to every one: how far do its estimates stray, and are their standard errors right?"
      testID="refit-form"
    >
      {models.isLoading ? <Loading label="Loading the fits…" /> : null}
      {fits.length === 0 && !models.isLoading ? <Text variant="muted">No model has a finished fit yet. Fit a model first.</Text> : null}
      <View role="group" accessibilityLabel="Fits to study">
        {fits.map((f) => (
          <Checkbox
            key={f.id}
            label={`${f.name} (fit ${f.id})`}
            hint={f.mode === 'fixed' ? 'values entered by hand' : f.converged ? 'converged' : 'did not converge: its estimates may be off'}
            checked={chosen.includes(f.id)}
            disabled={!chosen.includes(f.id) && chosen.length >= MAX_REFIT_FITS}
            onChange={(on) => setChosen((c) => (on ? [...c, f.id] : c.filter((x) => x !== f.id)))}
            testID={`refit-fit-${f.id}`}
          />
        ))}
      </View>
      <TextField label="Simulated panels per fit" value={replications} onChangeText={setReplications} keyboardType="number-pad" error={rError} hint="From 20 to 1000; the Monte Carlo errors shrink with the square root." testID="refit-replications" />
      <TextField label="Seed" value={seed} onChangeText={setSeed} keyboardType="number-pad" error={seedError} hint="Leave empty for a new one; the same seed gives the same study." testID="refit-seed" />
      {chosen.length > 1 ? (
        <Checkbox label="Also fit every other chosen model to each fit’s panels" hint="Shows what a wrong model makes of data from the right one." checked={cross} onChange={setCross} testID="refit-cross" />
      ) : null}
      <Text variant="caption">{total > 0 ? `${total} fits in all, on the study’s background workers.` : 'Choose at least one fit.'}</Text>
      {error ? <Banner tone="error">{error}</Banner> : null}
      <ButtonRow>
        <Button label="Start re-fit study" onPress={start} loading={busy} disabled={chosen.length === 0 || !!rError || !!seedError} testID="refit-start" />
      </ButtonRow>
    </Card>
  );
}

export function RefitListScreen() {
  const params = useLocalSearchParams<{ studyId: string; fits?: string }>();
  const studyId = parseStudyId(params.studyId);
  const study = useStudy(studyId);
  const refits = useRefits(studyId);
  if (studyId === null || study.error?.status === 404) return <StudyNotFound />;
  const mayRun = can(study.data?.study.myRole, 'runBatches');
  const list = refits.data?.refits ?? [];
  return (
    <Screen overline="Re-fit studies" title="Re-fit studies" subtitle={study.data?.study.name} above={<TextLink href={`/studies/${studyId}`}>← Study</TextLink>} testID="refits-page">
      {mayRun ? <StartForm studyId={studyId} preselected={parseIds(params.fits)} /> : null}
      <Section title="Studies so far">
        {refits.error ? <LoadError message={refits.error.message} onRetry={() => void refits.mutate()} /> : null}
        {refits.isLoading ? <Loading label="Loading re-fit studies…" /> : null}
        {!refits.isLoading && list.length === 0 ? <EmptyState title="No re-fit study yet" message={mayRun ? 'Choose fits above to start one.' : 'The lead or a statistician can start one.'} /> : null}
        {list.map((r) => (
          <RefitRow key={r.id} studyId={studyId} refit={r} />
        ))}
      </Section>
    </Screen>
  );
}
