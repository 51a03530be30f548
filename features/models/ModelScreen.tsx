import { useLocalSearchParams, useRouter } from 'expo-router';
import { useState } from 'react';
import { View } from 'react-native';
import { can } from '../../shared/api';
import {
  DEFAULT_PHASE3_RUNS,
  startFitBodySchema,
  type FitSummary,
  type ModelDetail,
  type StartFitBody,
} from '../../shared/models';
import { messageOf } from '../api/client';
import { fieldErrorsFromApi, validateWith, type FieldErrors } from '../forms/validation';
import { parseStudyId, useStudy } from '../studies/queries';
import { StudyNotFound } from '../studies/StudyNotFound';
import { Badge } from '../ui/Badge';
import { Banner } from '../ui/Banner';
import { Button, ButtonRow } from '../ui/Button';
import { Card } from '../ui/Card';
import { EmptyState } from '../ui/EmptyState';
import { formatDate } from '../ui/format';
import { Loading, LoadError } from '../ui/Loading';
import { Screen, Section } from '../ui/Screen';
import { Table, type Column } from '../ui/Table';
import { Text } from '../ui/Text';
import { TextField } from '../ui/TextField';
import { TextLink } from '../ui/TextLink';
import { space } from '../ui/tokens';
import { useBreakpoint } from '../ui/useBreakpoint';
import { convergenceWord, fitStateWords, fixed } from './format';
import { parseId } from '../api/params';
import { useFit, useFits, useModel, useModelMutations } from './queries';

interface ParamRow {
  key: string;
  label: string;
  explanation?: string;
  estimate: boolean;
  value: number | null;
}

const paramColumns: Column<ParamRow>[] = [
  { key: 'label', title: 'Parameter', flex: 2, render: (r) => <Text variant="bodyStrong">{r.label}</Text> },
  {
    key: 'how',
    title: 'How',
    flex: 1,
    render: (r) => <Badge label={r.estimate ? 'Estimated' : 'Fixed'} tone={r.estimate ? 'accent' : 'neutral'} />,
  },
  {
    key: 'value',
    title: 'Value',
    numeric: true,
    flex: 1.2,
    render: (r) => (
      <Text variant="figure">{r.value == null ? (r.estimate ? 'default start' : '—') : `${fixed(r.value)}${r.estimate ? ' (start)' : ''}`}</Text>
    ),
  },
];

function fitColumns(studyId: number, modelId: number): Column<FitSummary>[] {
  return [
    {
      key: 'id',
      title: 'Fit',
      flex: 1,
      sortValue: (f) => f.id,
      firstDirection: 'descending',
      render: (f) => (
        <TextLink href={`/studies/${studyId}/models/${modelId}/fits/${f.id}`} accessibilityLabel={`Open fit ${f.id}`}>
          {`Fit ${f.id}`}
        </TextLink>
      ),
    },
    {
      key: 'state',
      title: 'State',
      flex: 1.8,
      render: (f) => {
        const s = fitStateWords[f.state];
        const c = f.mode === 'estimate' && f.state === 'done' ? convergenceWord(f.converged) : null;
        return (
          <View style={{ flexDirection: 'row', flexWrap: 'wrap', gap: space.half }}>
            <Badge label={f.mode === 'fixed' ? 'Values entered' : s.label} tone={s.tone} icon={s.icon} />
            {c ? <Badge label={c.label} tone={c.tone} icon={c.icon} /> : null}
          </View>
        );
      },
    },
    {
      key: 'tau',
      title: 'Max. convergence ratio',
      numeric: true,
      flex: 1.2,
      render: (f) => <Text variant="figure">{fixed(f.tauMax)}</Text>,
    },
    {
      key: 'when',
      title: 'Started',
      flex: 1.5,
      sortValue: (f) => f.createdAt,
      firstDirection: 'descending',
      render: (f) => (
        <Text variant="small">
          {formatDate(f.createdAt)}
          {f.createdBy ? ` · ${f.createdBy}` : ''}
        </Text>
      ),
    },
  ];
}

/** Start an estimation: seed and Phase 3 runs, both optional. */
function EstimateCard({ model, onStarted }: { model: ModelDetail; onStarted: (fitId: number) => void }) {
  const { startFit } = useModelMutations(model.studyId);
  const [seed, setSeed] = useState('');
  const [runs, setRuns] = useState(String(DEFAULT_PHASE3_RUNS));
  const [errors, setErrors] = useState<FieldErrors>({});
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const nothingToEstimate = model.estimatedCount === 0;
  const blocking = model.notes.filter((n) => n.severity === 'error');
  const start = async () => {
    const body: StartFitBody = {
      phase3Runs: Number(runs.trim()),
      ...(seed.trim() ? { seed: Number(seed.trim()) } : {}),
    };
    const v = validateWith(startFitBodySchema, body);
    setErrors(v.errors);
    setError(null);
    if (!v.ok) return;
    setBusy(true);
    try {
      const fit = await startFit(model.id, body);
      onStarted(fit.id);
    } catch (e) {
      setErrors(fieldErrorsFromApi(e));
      setError(messageOf(e));
      setBusy(false);
    }
  };
  return (
    <Card title="Estimate" subtitle="The method of moments: simulate, compare with the observed statistics, adjust, until they match.">
      {nothingToEstimate ? <Banner tone="info">Every parameter of this model is fixed; enter the values by hand below instead.</Banner> : null}
      {blocking.length ? <Banner tone="error">{blocking.map((n) => n.message).join(' ')}</Banner> : null}
      {error ? <Banner tone="error">{error}</Banner> : null}
      <TextField
        label="Seed"
        hint="Optional. The same seed gives the same estimates; left empty, one is drawn and shown with the fit."
        value={seed}
        onChangeText={setSeed}
        keyboardType="number-pad"
        error={errors.seed}
        testID="fit-seed"
      />
      <TextField
        label="Runs for the standard errors (Phase 3)"
        hint={`${DEFAULT_PHASE3_RUNS} is usual; more gives steadier standard errors and convergence ratios.`}
        value={runs}
        onChangeText={setRuns}
        keyboardType="number-pad"
        error={errors.phase3Runs}
        testID="fit-runs"
      />
      <ButtonRow>
        <Button label="Start fit" onPress={start} loading={busy} disabled={nothingToEstimate || blocking.length > 0} testID="fit-start" />
      </ButtonRow>
    </Card>
  );
}

/** Store values entered by hand as a fit (so batches can simulate them). */
function ValuesCard({ model, defaults, onStarted }: { model: ModelDetail; defaults: Record<string, number>; onStarted: (fitId: number) => void }) {
  const { startFit } = useModelMutations(model.studyId);
  const params = [...model.rates, ...model.effects];
  const [values, setValues] = useState<Record<string, string>>(() =>
    Object.fromEntries(params.map((p) => [p.key, defaults[p.key] != null ? String(defaults[p.key]) : p.value != null ? String(p.value) : ''])),
  );
  const [errors, setErrors] = useState<FieldErrors>({});
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const { compact } = useBreakpoint();
  const save = async () => {
    const parsed: Record<string, number> = {};
    const local: FieldErrors = {};
    for (const p of params) {
      const raw = (values[p.key] ?? '').trim().replace(',', '.').replace('\u2212', '-');
      const v = Number(raw);
      if (raw === '' || !Number.isFinite(v)) local[`values.${p.key}`] = 'Enter a number.';
      else if (p.key.startsWith('rate:') && !(v > 0)) local[`values.${p.key}`] = 'A rate must be greater than 0.';
      else parsed[p.key] = v;
    }
    setErrors(local);
    setError(null);
    if (Object.keys(local).length) return;
    setBusy(true);
    try {
      const fit = await startFit(model.id, { mode: 'fixed', values: parsed });
      onStarted(fit.id);
    } catch (e) {
      setErrors(fieldErrorsFromApi(e));
      setError(messageOf(e));
      setBusy(false);
    }
  };
  return (
    <Card title="Enter values by hand" subtitle="Stored as a fit without estimation, for simulation batches. Filled in from the latest estimates where there are any.">
      {error ? <Banner tone="error">{error}</Banner> : null}
      <View style={{ flexDirection: compact ? 'column' : 'row', flexWrap: 'wrap', gap: space.s2 }}>
        {params.map((p) => (
          <View key={p.key} style={{ flexBasis: compact ? 'auto' : '46%', flexGrow: 1 }}>
            <TextField
              label={p.label}
              value={values[p.key] ?? ''}
              onChangeText={(t) => setValues((prev) => ({ ...prev, [p.key]: t }))}
              keyboardType="numbers-and-punctuation"
              error={errors[`values.${p.key}`] ?? (errors.values && !values[p.key] ? errors.values : undefined)}
              testID={`value-${p.key}`}
            />
          </View>
        ))}
      </View>
      <ButtonRow>
        <Button label="Store these values" variant="secondary" onPress={save} loading={busy} testID="fit-fixed" />
      </ButtonRow>
    </Card>
  );
}

export function ModelScreen() {
  const params = useLocalSearchParams<{ studyId: string; modelId: string }>();
  const studyId = parseStudyId(params.studyId);
  const modelId = parseId(params.modelId);
  const router = useRouter();
  const study = useStudy(studyId);
  const { data, error, isLoading, mutate } = useModel(studyId, modelId);
  const fits = useFits(studyId, modelId);
  const { remove } = useModelMutations(studyId ?? 0);
  const [showValues, setShowValues] = useState(false);
  const [confirmDelete, setConfirmDelete] = useState(false);
  const [deleteError, setDeleteError] = useState<string | null>(null);
  const [deleting, setDeleting] = useState(false);

  const fitList = fits.data?.fits ?? [];
  const latestDone = fitList.find((f) => f.state === 'done');
  const latestDetail = useFit(showValues && latestDone ? studyId : null, modelId, latestDone?.id ?? null);
  const valueDefaults: Record<string, number> | null = !latestDone
    ? {}
    : latestDetail.data?.fit.results
      ? Object.fromEntries(latestDetail.data.fit.results.parameters.map((q) => [q.key, q.value]))
      : latestDetail.error
        ? {}
        : null;

  if (studyId === null || modelId === null || study.error?.status === 404 || error?.status === 404) return <StudyNotFound />;
  const model = data?.model;
  const role = study.data?.study.myRole;
  const mayEdit = can(role, 'editModels');
  const mayFit = can(role, 'runBatches');
  const goToFit = (fitId: number) => router.push(`/studies/${studyId}/models/${modelId}/fits/${fitId}`);

  const rows: ParamRow[] = model
    ? [
        ...model.rates.map((r) => ({ key: r.key, label: r.label, estimate: r.estimate, value: r.value })),
        ...model.effects.map((e) => ({ key: e.key, label: e.label, estimate: e.estimate, value: e.value })),
      ]
    : [];

  const doDelete = async () => {
    setDeleting(true);
    setDeleteError(null);
    try {
      await remove(modelId);
      router.replace(`/studies/${studyId}/models`);
    } catch (e) {
      setDeleteError(messageOf(e));
      setDeleting(false);
    }
  };

  return (
    <Screen
      overline="Model"
      title={model?.name ?? 'Model'}
      subtitle={model ? model.description || `Made ${formatDate(model.createdAt)}${model.createdBy ? ` by ${model.createdBy}` : ''}` : undefined}
      above={<TextLink href={`/studies/${studyId}/models`}>← Models</TextLink>}
      actions={
        model && mayEdit ? (
          <>
            <Button label="Edit" variant="secondary" href={`/studies/${studyId}/models/${modelId}/edit`} testID="model-edit" />
            <Button label="Delete" variant="quiet" icon="trash" onPress={() => setConfirmDelete(true)} testID="model-delete" />
          </>
        ) : undefined
      }
      testID="model-page"
    >
      {error ? <LoadError message={error.message} onRetry={() => void mutate()} /> : null}
      {isLoading && !model ? <Loading label="Loading the model…" /> : null}
      {confirmDelete && model ? (
        <Banner
          tone="caution"
          word="Delete"
          action={
            <ButtonRow>
              <Button label="Delete model and fits" variant="danger" onPress={doDelete} loading={deleting} testID="model-delete-confirm" />
              <Button label="Keep it" variant="secondary" onPress={() => setConfirmDelete(false)} />
            </ButtonRow>
          }
        >
          {`"${model.name}" and its ${model.fitCount} fit${model.fitCount === 1 ? '' : 's'} will be removed. Batches keep their own copy of the values they simulated.`}
        </Banner>
      ) : null}
      {deleteError ? <Banner tone="error">{deleteError}</Banner> : null}
      {model ? (
        <>
          {model.notes.map((n, i) => (
            <Banner key={i} tone={n.severity === 'error' ? 'error' : 'caution'}>
              {n.message}
            </Banner>
          ))}
          <Section title="Parameters" description={`${model.periods.length} period${model.periods.length === 1 ? '' : 's'}, ${model.effectCount} effect${model.effectCount === 1 ? '' : 's'}; ${model.estimatedCount} to estimate.`}>
            <Table label="Parameters of this model" columns={paramColumns} rows={rows} rowKey={(r) => r.key} testID="model-parameters" />
          </Section>
          {mayFit ? (
            <Section title="Fit this model">
              <EstimateCard model={model} onStarted={goToFit} />
              {showValues ? (
                valueDefaults ? (
                  <ValuesCard model={model} defaults={valueDefaults} onStarted={goToFit} />
                ) : (
                  <Loading label="Reading the latest estimates…" />
                )
              ) : (
                <ButtonRow>
                  <Button label="Enter values by hand instead" variant="quiet" onPress={() => setShowValues(true)} testID="fit-fixed-open" />
                </ButtonRow>
              )}
            </Section>
          ) : null}
          <Section title="Fits" description={fitList.length > 0 && !latestDone ? 'No finished fit yet.' : undefined}>
            {fits.error ? <LoadError message={fits.error.message} onRetry={() => void fits.mutate()} /> : null}
            {fits.data && fitList.length === 0 ? (
              <EmptyState
                title="Not fitted yet"
                message={mayFit ? 'Start a fit above; it runs in the background and you can follow it live.' : 'A lead or statistician of this study can start a fit.'}
              />
            ) : null}
            {fitList.length > 0 ? (
              <Table label="Fits of this model" columns={fitColumns(studyId, modelId)} rows={fitList} rowKey={(f) => f.id} initialSort={{ key: 'id', direction: 'descending' }} testID="fit-table" />
            ) : null}
          </Section>
        </>
      ) : null}
    </Screen>
  );
}
