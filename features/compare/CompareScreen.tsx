/**
 * Two to four candidate models side by side, marked only where a methodologist would:
 * - per model a convergence line (pass / fail, with the largest |t| and the overall ratio) and an
 *   overall line (statistics failing at 0.05; the summed Mahalanobis distance), with the caution that
 *   p-values of different statistics are not independent;
 * - per parameter the estimate, its standard error and t = estimate / SE with a significance word
 *   (no model is marked better on an estimate);
 * - per statistic the p-value with its Monte Carlo standard error, and "better" only where one
 *   p-value is higher than the others by more than twice their combined Monte Carlo error (the rule
 *   is printed on the screen; rows within the error say so).
 * A table on a wide screen; on a phone the same rows stack as cards.
 */
import { useLocalSearchParams, useRouter } from 'expo-router';
import { View } from 'react-native';
import { CONVERGENCE_T_LIMIT, TAU_MAX_LIMIT } from '../../shared/models';
import { FAIL_LEVEL, formatPValue, MAX_COMPARE, SIGNIFICANCE_WORDS, VERDICT_WORDS, type CompareColumn, type CompareEstimateRow, type ComparePRow } from '../../shared/review';
import { Checkbox } from '../ui/Checkbox';
import { useBatches } from '../batches/queries';
import { parseIds } from '../api/params';
import { useCompare } from './queries';
import { RefitLine } from '../refits/RefitLine';
import { verdictLook } from '../board/verdictWords';
import { parseStudyId, useStudy } from '../studies/queries';
import { StudyNotFound } from '../studies/StudyNotFound';
import { Banner } from '../ui/Banner';
import { Button } from '../ui/Button';
import { Card } from '../ui/Card';
import { Icon } from '../ui/icons';
import { Loading, LoadError } from '../ui/Loading';
import { Screen, Section } from '../ui/Screen';
import { Table, type Column } from '../ui/Table';
import { Text } from '../ui/Text';
import { TextLink } from '../ui/TextLink';
import { colors } from '../ui/theme';
import { space } from '../ui/tokens';

const num = (x: number | null | undefined, d = 3) => (x === null || x === undefined ? '—' : x.toFixed(d));

function Better() {
  return (
    <View style={{ flexDirection: 'row', alignItems: 'center', gap: 2 }}>
      <Icon name="pass" size={14} color={colors.pass} />
      <Text variant="caption" style={{ color: colors.pass, fontWeight: '700' }}>
        better
      </Text>
    </View>
  );
}

const columnTitle = (c: CompareColumn) => `${c.modelName ?? c.label}${c.batchId ? ` · batch ${c.batchId}` : ` · fit ${c.fitId}`}`;

export function CompareScreen() {
  const params = useLocalSearchParams<{ studyId: string; batches?: string }>();
  const studyId = parseStudyId(params.studyId);
  const chosen = parseIds(params.batches);
  const router = useRouter();
  const study = useStudy(studyId);
  const batches = useBatches(studyId);
  const cmp = useCompare(studyId ?? 0, chosen);
  if (studyId === null || study.error?.status === 404) return <StudyNotFound />;
  const done = (batches.data?.batches ?? []).filter((b) => b.state === 'done');
  const choose = (id: number, on: boolean) => {
    const next = on ? [...chosen, id] : chosen.filter((x) => x !== id);
    router.setParams({ batches: next.join(',') });
  };
  const data = cmp.data;

  const estimateColumns: Column<CompareEstimateRow>[] = [
    { key: 'label', title: 'Parameter', flex: 1.6, render: (r) => <Text variant="bodyStrong">{r.label}</Text> },
    ...(data?.columns ?? []).map((c, i) => ({
      key: c.key,
      title: columnTitle(c),
      flex: 1.3,
      numeric: true,
      render: (r: CompareEstimateRow) => {
        const cell = r.cells[i];
        if (!cell) return <Text variant="figure">—</Text>;
        const test =
          cell.t !== null && cell.significance !== null
            ? `t = ${num(cell.t, 2)} · ${SIGNIFICANCE_WORDS[cell.significance]}`
            : r.kind === 'rate'
              ? 'rate: not tested'
              : 'no standard error: not tested';
        return (
          <View style={{ alignItems: 'flex-end', gap: 2 }} accessibilityLabel={`${num(cell.value)}${cell.se !== null ? `, standard error ${num(cell.se)}` : ''}, ${test}`} testID={`estimate-${r.key}-${i}`}>
            <Text variant="figure">{`${num(cell.value)}${cell.se !== null ? ` (${num(cell.se)})` : ''}`}</Text>
            <Text variant="caption" style={cell.significance === 'p1' || cell.significance === 'p5' ? { color: colors.ink } : undefined}>
              {test}
            </Text>
          </View>
        );
      },
    })),
  ];

  const pColumns: Column<ComparePRow>[] = [
    {
      key: 'label',
      title: 'Statistic',
      flex: 1.6,
      render: (r) => (
        <View style={{ gap: 2 }}>
          <Text variant="bodyStrong">{`${r.label}, period ${r.period}`}</Text>
          {r.difference === 'within' ? <Text variant="caption">Differences within Monte Carlo error: no model marked</Text> : null}
        </View>
      ),
    },
    ...(data?.columns ?? []).map((c, i) => ({
      key: c.key,
      title: columnTitle(c),
      flex: 1.3,
      numeric: true,
      render: (r: ComparePRow) => {
        const cell = r.cells[i];
        if (!cell) return <Text variant="figure">—</Text>;
        const look = cell.verdict ? verdictLook[cell.verdict] : null;
        return (
          <View
            style={{ alignItems: 'flex-end', gap: 2 }}
            testID={`p-${r.statistic}-${r.period}-${i}`}
            accessibilityLabel={`p ${formatPValue(cell.pValue)}, Monte Carlo standard error ${cell.mcSe.toFixed(3)}${cell.pValue < FAIL_LEVEL ? ', fails at 0.05' : ''}, verdict ${cell.verdict ? VERDICT_WORDS[cell.verdict] : 'awaiting review'}${r.better === i ? ', better beyond Monte Carlo error' : ''}`}
          >
            <Text variant="figure" style={r.better === i ? { fontWeight: '700' } : undefined}>{`p = ${formatPValue(cell.pValue)} ± ${cell.mcSe.toFixed(3)}`}</Text>
            {look ? (
              <View style={{ flexDirection: 'row', alignItems: 'center', gap: 2 }}>
                <Icon name={look.icon} size={14} color={look.fg} />
                <Text variant="caption" style={{ color: look.fg }}>
                  {look.word}
                </Text>
              </View>
            ) : (
              <Text variant="caption">awaiting review</Text>
            )}
            {r.better === i ? <Better /> : null}
          </View>
        );
      },
    })),
  ];

  return (
    <Screen
      overline="Compare models"
      title="Compare models"
      subtitle={study.data?.study.name}
      above={<TextLink href={`/studies/${studyId}/board`}>← Review board</TextLink>}
      actions={
        data && data.columns[0]?.batchId ? (
          <Button
            label="Fit report with this comparison"
            variant="secondary"
            href={`/studies/${studyId}/report?batch=${data.columns[0].batchId}&compare=${data.columns.slice(1).filter((c) => c.batchId).map((c) => c.batchId).join(',')}`}
          />
        ) : undefined
      }
    >
      <Card title="Choose two to four batches" subtitle="Each batch simulates one fitted model.">
        {batches.isLoading ? <Loading label="Loading batches…" /> : null}
        <View role="group" accessibilityLabel="Batches to compare">
          {done.map((b) => (
            <Checkbox
              key={b.id}
              label={b.label}
              hint={`${b.chains} chains · batch ${b.id}`}
              checked={chosen.includes(b.id)}
              disabled={!chosen.includes(b.id) && chosen.length >= MAX_COMPARE}
              onChange={(on) => choose(b.id, on)}
            />
          ))}
        </View>
        {chosen.length < 2 ? <Text variant="muted">Choose at least two.</Text> : null}
      </Card>
      {cmp.error ? <LoadError message={cmp.error.message} onRetry={() => void cmp.mutate()} /> : null}
      {cmp.isLoading ? <Loading label="Comparing…" /> : null}
      {data ? (
        <>
          <Section title="Models">
            <View style={{ flexDirection: 'row', flexWrap: 'wrap', gap: space.s2 }}>
              {data.columns.map((c, i) => (
                <Card key={c.key} title={columnTitle(c)} subtitle={c.label} style={{ flexBasis: 240, flexGrow: 1 }}>
                  <Text variant="small">{c.chains ? `${c.chains} chains` : 'No batch'}</Text>
                  <View style={{ flexDirection: 'row', alignItems: 'center', gap: space.half }} testID={`convergence-${i}`}>
                    {c.converged === null ? null : <Icon name={c.converged ? 'pass' : 'fail'} size={16} color={c.converged ? colors.pass : colors.fail} />}
                    <Text variant="small" style={c.converged === false ? { color: colors.fail, fontWeight: '700' } : undefined}>
                      {c.converged === null
                        ? 'Convergence: no check (values entered by hand)'
                        : `Convergence: ${c.converged ? 'pass' : 'fail'} (largest |t| ${num(c.maxAbsT)}, limit ${CONVERGENCE_T_LIMIT}; overall ratio ${num(c.tauMax)}, limit ${TAU_MAX_LIMIT})`}
                    </Text>
                  </View>
                  {data.overall[i] ? (
                    <Text variant="small" testID={`overall-${i}`}>
                      {`Fails at ${FAIL_LEVEL}: ${data.overall[i]!.failing} of ${data.overall[i]!.tested} statistics · summed distance ${num(data.overall[i]!.distanceSum, 1)}`}
                    </Text>
                  ) : null}
                  {data.verdicts[i] ? (
                    <Text variant="small">{`Verdicts: ${data.verdicts[i]!.pass} pass, ${data.verdicts[i]!.fail} fail, ${data.verdicts[i]!.unsure} unsure, ${data.verdicts[i]!.awaiting} awaiting`}</Text>
                  ) : null}
                </Card>
              ))}
            </View>
          </Section>
          <RefitLine studyId={studyId} fitIds={data.columns.map((c) => c.fitId).filter((id): id is number => id != null)} />
          <Banner tone="caution" testID="compare-independence">
            The p-values of different statistics come from the same simulated chains and are not independent: the counts failing at 0.05 are not a joint test, and with many statistics some fail by chance.
          </Banner>
          {data.notes.map((n) => (
            <Banner key={n} tone="info">
              {n}
            </Banner>
          ))}
          <Section
            title="Estimates"
            description="Estimate (standard error) and t = estimate / SE, significant at 5% when |t| ≥ 1.96 and at 1% when |t| ≥ 2.58 (normal approximation). Rates are positive by construction and not tested. No model is marked better on its estimates; convergence is the line per model above."
          >
            <Table label="Estimates by model" columns={estimateColumns} rows={data.estimates} rowKey={(r) => r.key} testID="compare-estimates" />
          </Section>
          <Section title="Goodness of fit" description={`Mahalanobis p-value ± its Monte Carlo standard error, and the team's verdict. ${data.betterRule}`}>
            <Table label="p-values by model" columns={pColumns} rows={data.pValues} rowKey={(r) => `${r.statistic}-${r.period}`} testID="compare-pvalues" />
          </Section>
        </>
      ) : null}
    </Screen>
  );
}
