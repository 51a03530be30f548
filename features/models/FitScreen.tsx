import { useLocalSearchParams, useRouter } from 'expo-router';
import { useState } from 'react';
import { View } from 'react-native';
import { can } from '../../shared/api';
import { CONVERGENCE_T_LIMIT, TAU_MAX_LIMIT, type FitDetail, type FitParameter } from '../../shared/models';
import { StaleDataBanner } from '../data/StaleDataBanner';
import { messageOf } from '../api/client';
import { parseStudyId, useStudy } from '../studies/queries';
import { StudyNotFound } from '../studies/StudyNotFound';
import { Badge } from '../ui/Badge';
import { Banner } from '../ui/Banner';
import { Button, ButtonRow } from '../ui/Button';
import { Card } from '../ui/Card';
import { formatDate } from '../ui/format';
import { Loading, LoadError } from '../ui/Loading';
import { Screen, Section } from '../ui/Screen';
import { Table, type Column } from '../ui/Table';
import { Text } from '../ui/Text';
import { TextLink } from '../ui/TextLink';
import { colors } from '../ui/theme';
import { radius, space } from '../ui/tokens';
import { CorrelationGrid } from './CorrelationGrid';
import { ScoreTestsSection } from './ScoreTestsSection';
import { convergenceWord, duration, fitStateWords, fixed, progressWords, roundsWords, tauHigh, tHigh } from './format';
import { parseId } from '../api/params';
import { useFit, useModel, useModelMutations } from './queries';

const resultColumns: Column<FitParameter>[] = [
  {
    key: 'label',
    title: 'Parameter',
    flex: 2.2,
    render: (q) => (
      <View style={{ gap: 2 }}>
        <Text variant="bodyStrong">{q.label}</Text>
        {!q.estimated ? <Text variant="caption">fixed, not estimated</Text> : null}
      </View>
    ),
  },
  { key: 'estimate', title: 'Estimate', numeric: true, flex: 1, render: (q) => <Text variant="figure">{fixed(q.value)}</Text> },
  { key: 'se', title: 'Standard error', numeric: true, flex: 1, render: (q) => <Text variant="figure">{q.estimated ? fixed(q.se) : '—'}</Text> },
  {
    key: 'wald',
    title: 'Estimate / SE',
    numeric: true,
    flex: 1,
    render: (q) => <Text variant="figure">{q.estimated && q.kind === 'objective' ? fixed(q.wald, 2) : '—'}</Text>,
  },
  {
    key: 't',
    title: 'Convergence t',
    numeric: true,
    flex: 1.2,
    render: (q) =>
      q.estimated ? (
        <Text variant="figure" style={{ color: tHigh(q.convergenceT) ? colors.unsure : colors.ink, fontWeight: tHigh(q.convergenceT) ? '700' : '400' }}>
          {fixed(q.convergenceT, 3)}
          {tHigh(q.convergenceT) ? ' ▲ high' : ''}
        </Text>
      ) : (
        <Text variant="figure">—</Text>
      ),
  },
];

/** Phase, sub-phase and iteration, with a bar whose figures are always written beside it. */
function FitProgressCard({ fit }: { fit: FitDetail }) {
  const p = fit.progress;
  const share = p ? Math.round(p.fraction * 100) : 0;
  return (
    <View style={{ gap: space.half }} testID="fit-progress">
      <View
        role="progressbar"
        aria-valuemin={0}
        aria-valuemax={100}
        aria-valuenow={share}
        accessibilityLabel={p ? progressWords(p) : 'Waiting to start'}
        style={{ height: 10, borderRadius: radius.pill, backgroundColor: colors.surfaceSunk, borderWidth: 1, borderColor: colors.rule, overflow: 'hidden', flexDirection: 'row' }}
      >
        <View style={{ width: `${share}%`, height: '100%', backgroundColor: colors.accent }} />
      </View>
      <Text variant="small">{p ? progressWords(p) : 'Waiting for a worker'}</Text>
      <Text variant="caption">
        About {share}% of the most work this fit can take; Phase 2 often ends its sub-phases early.
      </Text>
    </View>
  );
}

function Figure({ label, value, flag, testID }: { label: string; value: string; flag?: string; testID?: string }) {
  return (
    <View style={{ minWidth: 120, gap: 2 }} testID={testID}>
      <Text variant="figureLarge" style={flag ? { color: colors.unsure } : undefined}>
        {value}
      </Text>
      <Text variant="caption">
        {label}
        {flag ? ` · ${flag}` : ''}
      </Text>
    </View>
  );
}

export function FitScreen() {
  const params = useLocalSearchParams<{ studyId: string; modelId: string; fitId: string }>();
  const studyId = parseStudyId(params.studyId);
  const modelId = parseId(params.modelId);
  const fitId = parseId(params.fitId);
  const router = useRouter();
  const study = useStudy(studyId);
  const model = useModel(studyId, modelId);
  const { data, error, isLoading, mutate } = useFit(studyId, modelId, fitId);
  const { cancelFit, startFit } = useModelMutations(studyId ?? 0);
  const [actionError, setActionError] = useState<string | null>(null);
  const [busy, setBusy] = useState<'cancel' | 'again' | null>(null);
  const [showLog, setShowLog] = useState(false);

  if (studyId === null || modelId === null || fitId === null || study.error?.status === 404 || error?.status === 404) return <StudyNotFound />;
  const fit = data?.fit;
  const mayRun = can(study.data?.study.myRole, 'runBatches');
  const active = fit?.state === 'queued' || fit?.state === 'running';
  const r = fit?.results ?? null;
  const estimated = r ? r.parameters.filter((q) => q.estimated) : [];

  const doCancel = async () => {
    setBusy('cancel');
    setActionError(null);
    try {
      await cancelFit(modelId, fitId);
    } catch (e) {
      setActionError(messageOf(e));
    } finally {
      setBusy(null);
    }
  };
  const runAgain = async () => {
    if (!fit) return;
    setBusy('again');
    setActionError(null);
    try {
      const next = await startFit(modelId, { startFrom: fit.id, phase3Runs: fit.phase3Runs });
      router.push(`/studies/${studyId}/models/${modelId}/fits/${next.id}`);
    } catch (e) {
      setActionError(messageOf(e));
    } finally {
      setBusy(null);
    }
  };

  const state = fit ? fitStateWords[fit.state] : null;
  const conv = fit && fit.mode === 'estimate' && r ? convergenceWord(r.converged) : null;
  const maxT = r?.maxAbsT ?? null;

  return (
    <Screen
      overline={model.data ? `Fit of ${model.data.model.name}` : 'Fit'}
      title={fit ? `Fit ${fit.id}` : 'Fit'}
      subtitle={
        fit
          ? `${fit.mode === 'fixed' ? 'Values entered by hand' : `Seed ${fit.seed} · ${fit.phase3Runs} runs for the standard errors`}${fit.startFrom ? ` · continued from fit ${fit.startFrom}` : ''} · ${formatDate(fit.createdAt)}${fit.createdBy ? ` by ${fit.createdBy}` : ''}`
          : undefined
      }
      above={<TextLink href={`/studies/${studyId}/models/${modelId}`}>← {model.data?.model.name ?? 'Model'}</TextLink>}
      actions={
        active && mayRun ? (
          <Button label="Cancel fit" variant="danger" onPress={doCancel} loading={busy === 'cancel'} testID="fit-cancel" />
        ) : fit?.state === 'done' ? (
          <Button label="Why actors choose" variant="secondary" href={`/studies/${studyId}/explore/fits/${fit.id}?model=${modelId}`} testID="fit-explore" />
        ) : undefined
      }
      testID="fit-page"
    >
      {error ? <LoadError message={error.message} onRetry={() => void mutate()} /> : null}
      {isLoading && !fit ? <Loading label="Loading the fit…" /> : null}
      {actionError ? <Banner tone="error">{actionError}</Banner> : null}
      {fit && studyId !== null ? <StaleDataBanner studyId={studyId} createdAt={fit.createdAt} what="fit" /> : null}
      {fit && state ? (
        <>
          <Card>
            <View style={{ flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', gap: space.s1 }}>
              <Badge label={fit.mode === 'fixed' ? 'Values entered' : state.label} tone={state.tone} icon={state.icon} />
              {conv ? <Badge label={conv.label} tone={conv.tone} icon={conv.icon} /> : null}
            </View>
            {active ? <FitProgressCard fit={fit} /> : null}
            {fit.state === 'failed' ? (
              <Banner tone="error" word="The fit failed" testID="fit-failed">
                {fit.error ?? 'No reason was recorded.'} No estimates were stored; the log below shows how far it got.
              </Banner>
            ) : null}
            {fit.state === 'cancelled' ? <Banner tone="caution">This fit was cancelled; it keeps no estimates.</Banner> : null}
          </Card>

          {r && fit.mode === 'estimate' ? (
            r.converged ? (
              <Banner tone="success" word="Converged" testID="fit-converged">
                Every convergence t-ratio is below {CONVERGENCE_T_LIMIT} in size (largest {fixed(maxT, 3)}) and the overall maximum convergence ratio is {fixed(r.tauMax, 3)}, below {TAU_MAX_LIMIT}:
                the simulated statistics match the observed ones, so the estimates can be read.
              </Banner>
            ) : (
              <Banner
                tone="caution"
                word="Not converged"
                testID="fit-not-converged"
                action={
                  mayRun ? (
                    <ButtonRow>
                      <Button label="Run again from these estimates" onPress={runAgain} loading={busy === 'again'} testID="fit-again" />
                    </ButtonRow>
                  ) : undefined
                }
              >
                The simulated statistics do not yet match the observed ones closely enough to trust these estimates (common practice asks for every
                |t| below {CONVERGENCE_T_LIMIT} and an overall ratio below {TAU_MAX_LIMIT}; here the largest |t| is {fixed(maxT, 3)} and the overall ratio{' '}
                {fixed(r.tauMax, 3)}). Running again from these estimates usually fixes this.
              </Banner>
            )
          ) : null}

          {r ? (
            <>
              <Section title="Estimates">
                <Table label="Estimates, standard errors and convergence t-ratios" columns={resultColumns} rows={r.parameters} rowKey={(q) => q.key} testID="fit-results" />
                {fit.mode === 'estimate' ? (
                  <Text variant="caption">
                    Estimate / SE above 2 in size suggests the effect matters. The convergence t compares the simulated with the observed statistic of each
                    parameter, in standard deviations.
                  </Text>
                ) : null}
              </Section>
              {fit.mode === 'estimate' ? (
                <Card title="Diagnostics">
                  <View style={{ flexDirection: 'row', flexWrap: 'wrap', gap: space.s3 }}>
                    <Figure label="overall max. convergence ratio" value={fixed(r.tauMax, 3)} flag={tauHigh(r.tauMax) ? 'high' : undefined} testID="fit-tau" />
                    <Figure label="largest |convergence t|" value={fixed(maxT, 3)} flag={tHigh(maxT) ? 'high' : undefined} />
                    <Figure
                      label="condition number of the derivative matrix"
                      value={r.conditionNumber == null ? '—' : r.conditionNumber >= 1e5 ? r.conditionNumber.toExponential(1) : fixed(r.conditionNumber, 1)}
                      flag={r.conditionNumber != null && r.conditionNumber > 1e4 ? 'high' : undefined}
                    />
                    <Figure label="periods simulated" value={r.simulatedPeriods.toLocaleString('en-GB')} />
                    <Figure label="time taken" value={duration(r.seconds)} />
                  </View>
                  <Text variant="caption">Phase 2 iterations per sub-phase: {r.phase2Iterations.join(', ')}.</Text>
                  {r.rounds != null ? (
                    <Text variant="caption" testID="fit-rounds">
                      {roundsWords(r.rounds, r.roundBudget ?? null, r.converged)}
                    </Text>
                  ) : null}
                  {r.warnings.map((w, i) => (
                    <Banner key={i} tone="caution">
                      {w}
                    </Banner>
                  ))}
                </Card>
              ) : null}
              {r.correlation && estimated.length > 1 ? (
                <Section title="How the estimates move together" description="Correlations of the estimates, from their covariance matrix.">
                  <Card>
                    <CorrelationGrid labels={r.estimatedKeys.map((k) => r.parameters.find((q) => q.key === k)?.label ?? k)} matrix={r.correlation} testID="fit-correlation" />
                  </Card>
                </Section>
              ) : null}
              {fit.state === 'done' ? <ScoreTestsSection studyId={studyId} modelId={modelId} fitId={fitId} mayEdit={can(study.data?.study.myRole, 'editModels')} /> : null}
            </>
          ) : null}

          {fit.log.length > 0 ? (
            <Section
              title="Log"
              actions={<Button label={showLog ? 'Hide log' : 'Show log'} variant="quiet" onPress={() => setShowLog((s) => !s)} testID="fit-log-toggle" />}
            >
              {showLog || fit.state === 'failed' ? (
                <Card testID="fit-log">
                  {fit.log.map((line, i) => {
                    const m = /^(\S+)\s+(.*)$/.exec(line);
                    return (
                      <Text key={i} variant="figure" style={{ fontSize: 12, lineHeight: 18 }}>
                        {m ? `${m[1].slice(11, 19)}  ${m[2]}` : line}
                      </Text>
                    );
                  })}
                </Card>
              ) : null}
            </Section>
          ) : null}
        </>
      ) : null}
    </Screen>
  );
}
