/**
 * One re-fit study: progress and cancel while it runs; then, per parameter, the models' estimate
 * distributions with the generating values marked; a scatter of two chosen parameters with their
 * correlation; the grid of all correlations (|r| > 0.9 flagged in words); the table of bias, SD of the
 * estimates, mean SE, their ratio and 95% coverage, each with its Monte Carlo error; the share of
 * re-fits that converged, with a plain caution when it is low. Phone first: everything stacks; on a
 * wide screen the panels sit side by side.
 */
import { useLocalSearchParams } from 'expo-router';
import { useState } from 'react';
import { Linking, View } from 'react-native';
import { can } from '../../shared/api';
import { LOW_CONVERGENCE_SHARE, type McValue, type RefitGroup, type RefitParameterSummary } from '../../shared/refits';
import { getApiBase, messageOf } from '../api/client';
import { parseId } from '../api/params';
import { stateWords, timeLeft } from '../batches/format';
import { ProgressBar } from '../batches/ProgressBar';
import { ChoiceChips } from '../consensus/ChoiceChips';
import { CorrelationGrid } from '../models/CorrelationGrid';
import { parseStudyId, useStudy } from '../studies/queries';
import { StudyNotFound } from '../studies/StudyNotFound';
import { Badge } from '../ui/Badge';
import { Banner } from '../ui/Banner';
import { Button, ButtonRow } from '../ui/Button';
import { Card } from '../ui/Card';
import { formatDate } from '../ui/format';
import { Loading, LoadError } from '../ui/Loading';
import { Screen, Section } from '../ui/Screen';
import { SegmentedControl } from '../ui/SegmentedControl';
import { Table, type Column } from '../ui/Table';
import { Text } from '../ui/Text';
import { TextLink } from '../ui/TextLink';
import { space } from '../ui/tokens';
import { useBreakpoint } from '../ui/useBreakpoint';
import { EstimateDots, GROUP_COLOURS, PairScatter, type DotRow } from './RefitCharts';
import { refitKeys, useRefit, useRefitMutations, useRefitResults } from './queries';

const f3 = (x: number | null) => (x == null ? '—' : x.toFixed(3));
const mc = (v: McValue, digits = 3) => (v.value == null ? '—' : `${v.value.toFixed(digits)} ± ${v.mcError == null ? '—' : v.mcError.toFixed(digits)}`);
const pct = (v: McValue) => (v.value == null ? '—' : `${(v.value * 100).toFixed(0)}% ± ${v.mcError == null ? '—' : (v.mcError * 100).toFixed(0)}`);

const columns: Column<RefitParameterSummary>[] = [
  { key: 'label', title: 'Parameter', flex: 1.6, render: (q) => <Text variant="bodyStrong">{q.label}</Text> },
  { key: 'truth', title: 'Generating value', numeric: true, render: (q) => <Text variant="figure">{f3(q.truth)}</Text> },
  { key: 'bias', title: 'Bias ± MC error', numeric: true, flex: 1.3, render: (q) => <Text variant="figure">{mc(q.bias)}</Text> },
  { key: 'sd', title: 'SD of estimates', numeric: true, flex: 1.3, render: (q) => <Text variant="figure">{mc(q.sd)}</Text> },
  { key: 'se', title: 'Mean SE', numeric: true, flex: 1.3, render: (q) => <Text variant="figure">{mc(q.meanSe)}</Text> },
  { key: 'ratio', title: 'SD / mean SE', numeric: true, flex: 1.2, render: (q) => <Text variant="figure">{mc(q.ratio, 2)}</Text> },
  { key: 'coverage', title: '95% coverage', numeric: true, flex: 1.2, render: (q) => <Text variant="figure">{pct(q.coverage)}</Text> },
];

function convergenceLine(g: RefitGroup): string {
  if (g.refits === 0) return 'No re-fit yet.';
  const share = g.convergedShare ?? 0;
  return `${g.converged} of ${g.refits} re-fits converged (${Math.round(share * 100)}%)${g.failed ? `; ${g.failed} failed` : ''}.`;
}

function GroupCautions({ group }: { group: RefitGroup }) {
  const low = group.convergedShare !== null && group.convergedShare < LOW_CONVERGENCE_SHARE;
  return (
    <View style={{ gap: space.s1 }}>
      <Text variant="bodyStrong">{group.title}</Text>
      <Text variant={low ? 'bodyStrong' : 'muted'}>{convergenceLine(group)}</Text>
      {group.cautions.map((c, k) => (
        <Banner key={k} tone="caution">
          {c}
        </Banner>
      ))}
    </View>
  );
}

function PairCard({ groups, titles }: { groups: RefitGroup[]; titles: string[] }) {
  const [g, setG] = useState('0');
  const group = groups[Number(g)] ?? groups[0];
  const pairs = group.correlations;
  // Start with the first pair of two effects (rates rarely tell much together).
  const firstEffects = (gr: RefitGroup) => String(Math.max(0, gr.correlations.findIndex((c) => !c.a.startsWith('rate:') && !c.b.startsWith('rate:'))));
  const [pair, setPair] = useState(() => firstEffects(group));
  const chosen = pairs[Number(pair)] ?? pairs[0];
  if (!chosen) return <Text variant="muted">A pair needs at least two estimated parameters.</Text>;
  const a = group.parameters.find((q) => q.key === chosen.a)!;
  const b = group.parameters.find((q) => q.key === chosen.b)!;
  return (
    <View style={{ gap: space.s2 }}>
      {groups.length > 1 ? (
        <ChoiceChips
          label="Re-fits of"
          options={groups.map((_, k) => ({ value: String(k), label: titles[k] }))}
          value={g}
          onChange={(v) => {
            setG(v);
            setPair(firstEffects(groups[Number(v)] ?? groups[0]));
          }}
        />
      ) : null}
      <ChoiceChips
        label="Pair of parameters"
        options={pairs.map((p, k) => ({ value: String(k), label: `${group.parameters.find((q) => q.key === p.a)!.label} × ${group.parameters.find((q) => q.key === p.b)!.label}` }))}
        value={pair}
        onChange={setPair}
      />
      <Text variant="bodyStrong" testID="pair-r">
        {`r = ${chosen.r == null ? '—' : chosen.r.toFixed(2)} over ${Math.min(a.count, b.count)} re-fits`}
        {chosen.flagged ? ' · high: these two estimates move together' : ''}
      </Text>
      <PairScatter a={a} b={b} r={chosen.r} colour={GROUP_COLOURS[Number(g) % GROUP_COLOURS.length]} testID="pair-scatter" />
      <Text variant="caption">Each dot is one re-fit; the cross marks the generating values.</Text>
    </View>
  );
}

function correlationMatrix(group: RefitGroup): (number | null)[][] {
  const keys = group.parameters.map((q) => q.key);
  return keys.map((a, i) =>
    keys.map((b, j) => {
      if (i === j) return 1;
      const c = group.correlations.find((x) => (x.a === a && x.b === b) || (x.a === b && x.b === a));
      return c?.r ?? null;
    }),
  );
}

export function RefitScreen() {
  const params = useLocalSearchParams<{ studyId: string; refitId: string }>();
  const studyId = parseStudyId(params.studyId);
  const refitId = parseId(params.refitId);
  const study = useStudy(studyId);
  const { data, error, isLoading, mutate } = useRefit(studyId, refitId);
  const { cancel } = useRefitMutations(studyId ?? 0);
  const [include, setInclude] = useState<'converged' | 'all'>('converged');
  const [cancelError, setCancelError] = useState<string | null>(null);
  const [cancelling, setCancelling] = useState(false);
  const { compact, breakpoint } = useBreakpoint();
  const refit = data?.refit;
  const results = useRefitResults(studyId ?? 0, refit, include);
  if (studyId === null || refitId === null || study.error?.status === 404 || error?.status === 404) return <StudyNotFound />;
  const active = refit?.state === 'queued' || refit?.state === 'running';
  const mayRun = can(study.data?.study.myRole, 'runBatches');
  const state = refit ? stateWords[refit.state] : null;
  const wide = breakpoint === 'wide';
  const half = compact ? undefined : ({ flexBasis: '48%', flexGrow: 1, minWidth: 320 } as const);

  const doCancel = async () => {
    if (!refit) return;
    setCancelling(true);
    setCancelError(null);
    try {
      await cancel(refit.id);
    } catch (e) {
      setCancelError(messageOf(e));
    } finally {
      setCancelling(false);
    }
  };
  const download = (each: boolean) => void Linking.openURL(getApiBase().replace(/\/api$/, '') + refitKeys.csv(studyId, refitId, include, each));

  const groups = results.data?.groups ?? [];
  const titles = groups.map((g) => g.title);
  // Parameter panels: every key of any group, in first-seen order.
  const keys: { key: string; label: string }[] = [];
  for (const g of groups) for (const q of g.parameters) if (!keys.some((k) => k.key === q.key)) keys.push({ key: q.key, label: q.label });

  return (
    <Screen
      overline="Re-fit study"
      title={refit?.label ?? 'Re-fit study'}
      subtitle={refit ? `${refit.replications} panels per fit · seed ${refit.seed} · ${refit.phase3Runs} Phase 3 runs · started ${formatDate(refit.createdAt)}${refit.createdBy ? ` by ${refit.createdBy}` : ''}` : undefined}
      above={<TextLink href={`/studies/${studyId}/refits`}>← Re-fit studies</TextLink>}
      actions={active && mayRun ? <Button label="Cancel study" variant="danger" onPress={doCancel} loading={cancelling} testID="refit-cancel" /> : undefined}
      testID="refit-page"
    >
      {error ? <LoadError message={error.message} onRetry={() => void mutate()} /> : null}
      {isLoading && !refit ? <Loading label="Loading the re-fit study…" /> : null}
      {cancelError ? <Banner tone="error">{cancelError}</Banner> : null}
      {refit && state ? (
        <Card>
          <View style={{ flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', gap: space.s1 }}>
            <Badge label={state.label} tone={state.tone} icon={state.icon} />
            <Text variant="caption">{refit.cross ? 'Every chosen model fitted to every chosen fit’s panels' : 'Each model fitted again to its own panels'}</Text>
          </View>
          {active ? (
            <ProgressBar testID="refit-progress" unit="re-fits" done={refit.refitsDone} total={refit.refitsTotal} caption={refit.state === 'queued' ? 'waiting for a worker' : timeLeft(refit.secondsLeft)} />
          ) : null}
          {refit.state === 'failed' ? <Banner tone="error">{refit.error ?? 'The re-fit study failed.'}</Banner> : null}
          {refit.state === 'cancelled' ? <Banner tone="caution">{`This study was cancelled after ${refit.refitsDone} of ${refit.refitsTotal} re-fits; the figures below describe those alone.`}</Banner> : null}
          {refit.models.map((m, k) => (
            <View key={m.fitId} style={{ flexDirection: 'row', alignItems: 'flex-start', gap: space.half }}>
              <View style={{ width: 10, height: 10, marginTop: 5, borderRadius: 5, backgroundColor: GROUP_COLOURS[k % GROUP_COLOURS.length] }} />
              <Text variant="caption" style={{ flexShrink: 1 }}>
                {`${m.name}${m.handEntered ? ' (values entered by hand)' : m.converged ? '' : ' (the fit itself did not converge: its estimates may be off)'}: `}
                {m.labels.map((l, i) => `${l} ${m.values[i].toFixed(3)}`).join(' · ')}
              </Text>
            </View>
          ))}
        </Card>
      ) : null}
      {results.error ? <LoadError message={results.error.message} onRetry={() => void results.mutate()} /> : null}
      {results.isLoading ? <Loading label="Summarising the re-fits…" /> : null}
      {results.data ? (
        <>
          <SegmentedControl
            label="Re-fits in the figures"
            options={[
              { value: 'converged', label: 'Converged only' },
              { value: 'all', label: 'All that finished' },
            ]}
            value={include}
            onChange={setInclude}
          />
          <Card title="Convergence and cautions" testID="refit-cautions">
            {groups.map((g) => (
              <GroupCautions key={`${g.source}-${g.target}`} group={g} />
            ))}
          </Card>
          <Section title="Distributions of the estimates" description="One panel per parameter; one row per set of re-fits. Dots are re-fits, the dark bar is the value the panels were simulated with, the diamond the mean estimate.">
            <View style={{ flexDirection: compact ? 'column' : 'row', flexWrap: 'wrap', gap: space.s2 }} testID="refit-panels">
              {keys.map(({ key, label }) => {
                const rows: DotRow[] = groups
                  .map((g, k) => ({ g, k }))
                  .filter(({ g }) => g.parameters.some((q) => q.key === key))
                  .map(({ g, k }) => ({ title: g.title, colour: GROUP_COLOURS[(groups.length > 1 && !results.data!.refit.cross ? k : g.target) % GROUP_COLOURS.length], summary: g.parameters.find((q) => q.key === key)! }));
                return (
                  <Card key={key} title={label} style={half} testID={`panel-${key}`}>
                    <EstimateDots label={label} rows={rows} />
                  </Card>
                );
              })}
            </View>
          </Section>
          <View style={{ flexDirection: wide ? 'row' : 'column', gap: space.s2, alignItems: 'flex-start' }}>
            <Card title="Two parameters together" style={wide ? { flex: 1 } : undefined} testID="refit-pair">
              <PairCard groups={groups} titles={titles} />
            </Card>
            <Card title="Correlations of the estimates across re-fits" subtitle="|r| above 0.9 is marked “high” and named below the grid." style={wide ? { flex: 1 } : undefined} testID="refit-correlations">
              {groups.map((g) => (
                <View key={`${g.source}-${g.target}`} style={{ gap: space.s1 }}>
                  <Text variant="label">{g.title}</Text>
                  <CorrelationGrid labels={g.parameters.map((q) => q.label)} matrix={correlationMatrix(g)} />
                </View>
              ))}
            </Card>
          </View>
          <Section
            title="Bias, spread and coverage"
            description="Each figure with its Monte Carlo error (± one standard error over the re-fits). SD / mean SE near 1 means the standard errors are about right; coverage near 95% means the intervals can be trusted."
            actions={
              <ButtonRow>
                <Button label="Summary (CSV)" variant="quiet" onPress={() => download(false)} accessibilityLabel="Download the summary table as CSV" />
                <Button label="Every re-fit (CSV)" variant="quiet" onPress={() => download(true)} accessibilityLabel="Download every re-fit's estimates as CSV" />
              </ButtonRow>
            }
          >
            {groups.map((g) => (
              <Card key={`${g.source}-${g.target}`} title={g.title} subtitle={convergenceLine(g)} testID={`refit-table-${g.source}-${g.target}`}>
                <Table label={`Bias, spread and coverage: ${g.title}`} columns={columns} rows={g.parameters} rowKey={(q) => q.key} />
              </Card>
            ))}
          </Section>
        </>
      ) : null}
    </Screen>
  );
}
