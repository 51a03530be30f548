import { useLocalSearchParams, useRouter } from 'expo-router';
import { useMemo, useState } from 'react';
import { View } from 'react-native';
import useSWR from 'swr';
import { can } from '../../shared/api';
import { AUX_STATISTIC_CATALOGUE, type AuxStatisticId } from '../../shared/auxStatistics';
import { DEFAULT_CHAINS, MAX_CHAINS, createBatchBodySchema, type CreateBatchBody } from '../../shared/batches';
import { EFFECT_CATALOGUE, type EffectId } from '../../shared/effects';
import type { ModelSummary } from '../../shared/models';
import { messageOf, type ApiError } from '../api/client';
import { fieldErrorsFromApi, validateWith, type FieldErrors } from '../forms/validation';
import { parseStudyId, useStudy, useStudyData } from '../studies/queries';
import { StudyNotFound } from '../studies/StudyNotFound';
import { Banner } from '../ui/Banner';
import { Button, ButtonRow } from '../ui/Button';
import { Card } from '../ui/Card';
import { Loading } from '../ui/Loading';
import { Screen } from '../ui/Screen';
import { SegmentedControl } from '../ui/SegmentedControl';
import { Text } from '../ui/Text';
import { TextField } from '../ui/TextField';
import { TextLink } from '../ui/TextLink';
import { space } from '../ui/tokens';
import { Checkbox } from '../ui/Checkbox';
import { useBatchMutations } from './queries';

type Source = 'fit' | 'model';

interface EffectChoice {
  on: boolean;
  value: string;
  covariate: string | null;
}

/** Starting values for a hand-entered model: a sparse network with some reciprocity. */
const STARTING: Partial<Record<EffectId, string>> = { density: '-2', reciprocity: '1' };

const toNumber = (s: string): number => (s.trim() === '' ? NaN : Number(s.replace(',', '.')));

export function NewBatchScreen() {
  const params = useLocalSearchParams<{ studyId: string }>();
  const studyId = parseStudyId(params.studyId);
  const router = useRouter();
  const study = useStudy(studyId);
  const data = useStudyData(studyId);
  const models = useSWR<{ models: ModelSummary[] }, ApiError>(studyId != null ? `/studies/${studyId}/models` : null);
  const { create } = useBatchMutations(studyId ?? 0);

  const fits = useMemo(
    () => (models.data?.models ?? []).filter((m) => m.latestFit && m.latestFit.state === 'done').map((m) => ({ model: m, fit: m.latestFit! })),
    [models.data],
  );
  const [source, setSource] = useState<Source | null>(null);
  const chosenSource: Source = source ?? (fits.length > 0 ? 'fit' : 'model');
  const [fitId, setFitId] = useState<number | null>(null);
  const [rates, setRates] = useState<string[]>([]);
  const [effects, setEffects] = useState<Record<string, EffectChoice>>({});
  const [chains, setChains] = useState(String(DEFAULT_CHAINS));
  const [seed, setSeed] = useState('');
  const [label, setLabel] = useState('');
  const [statistics, setStatistics] = useState<AuxStatisticId[]>(AUX_STATISTIC_CATALOGUE.map((s) => s.id));
  const [errors, setErrors] = useState<FieldErrors>({});
  const [formError, setFormError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);

  if (studyId === null || study.error?.status === 404) return <StudyNotFound />;
  const role = study.data?.study.myRole;
  const periods = Math.max(0, (data.data?.waves.length ?? 0) - 1);
  const covariates = data.data?.covariates ?? [];
  const rateAt = (k: number) => rates[k] ?? '2';
  const effectAt = (id: EffectId): EffectChoice => effects[id] ?? { on: id in STARTING, value: STARTING[id] ?? '0', covariate: null };
  const setEffect = (id: EffectId, change: Partial<EffectChoice>) => setEffects((prev) => ({ ...prev, [id]: { ...effectAt(id), ...change } }));

  const submit = async () => {
    if (busy) return;
    setFormError(null);
    const body: Record<string, unknown> = {
      chains: toNumber(chains),
      statistics,
      ...(label.trim() ? { label: label.trim() } : {}),
      ...(seed.trim() ? { seed: toNumber(seed) } : {}),
    };
    if (chosenSource === 'fit') {
      body.fitId = fitId ?? fits[0]?.fit.id;
    } else {
      body.model = {
        rates: Array.from({ length: periods }, (_, k) => toNumber(rateAt(k))),
        effects: EFFECT_CATALOGUE.filter((e) => effectAt(e.id).on).map((e) => {
          const c = effectAt(e.id);
          return { id: e.id, value: toNumber(c.value), ...(e.covariate !== 'none' ? { covariate: c.covariate ?? '' } : {}) };
        }),
      };
    }
    const v = validateWith(createBatchBodySchema, body);
    setErrors(v.errors);
    if (!v.ok) {
      setFormError('Some entries need a look; the messages are beside them.');
      return;
    }
    setBusy(true);
    try {
      const batch = await create(body as CreateBatchBody);
      router.replace(`/studies/${studyId}/batches/${batch.id}`);
    } catch (e) {
      setErrors(fieldErrorsFromApi(e));
      setFormError(messageOf(e));
      setBusy(false);
    }
  };

  if (study.data && !can(role, 'runBatches')) {
    return (
      <Screen title="New batch" narrow above={<TextLink href={`/studies/${studyId}/batches`}>← Batches</TextLink>}>
        <Banner tone="info">Only a lead or statistician of this study can start a batch; your role is {role ?? 'none'}.</Banner>
      </Screen>
    );
  }

  return (
    <Screen
      title="New batch"
      subtitle="Simulate the model many times from each observed start wave, then compare with the next wave."
      narrow
      above={<TextLink href={`/studies/${studyId}/batches`}>← Batches</TextLink>}
      testID="batch-form"
    >
      {!data.data || !study.data ? <Loading label="Loading the study data…" /> : null}
      {data.data && !data.data.hasData ? <Banner tone="caution">This study has no data yet: upload at least two waves first.</Banner> : null}
      {data.data?.hasData ? (
        <View role="form" accessibilityLabel="New batch" style={{ gap: space.s3 }}>
          {formError ? <Banner tone="error">{formError}</Banner> : null}
          <Card title="Model">
            <SegmentedControl<Source>
              label="Simulate"
              options={[
                { value: 'fit', label: 'A stored fit', description: 'the estimates of a finished fit' },
                { value: 'model', label: 'Values I enter', description: 'a rate per period and a value per effect' },
              ]}
              value={chosenSource}
              onChange={setSource}
            />
            {chosenSource === 'fit' ? (
              fits.length === 0 ? (
                <Text variant="muted">No finished fits yet. Fit a model first, or enter values by hand.</Text>
              ) : (
                <View style={{ gap: space.half }} accessibilityRole="radiogroup" accessibilityLabel="Fit to simulate">
                  {fits.map(({ model, fit }) => (
                    <Checkbox
                      key={fit.id}
                      label={`${model.name} — fit ${fit.id}`}
                      hint={`${fit.mode === 'fixed' ? 'values entered by hand' : fit.converged ? 'estimated, converged' : 'estimated, not converged'}; periods ${model.periods.join(', ')}`}
                      checked={(fitId ?? fits[0].fit.id) === fit.id}
                      onChange={() => setFitId(fit.id)}
                      testID={`fit-${fit.id}`}
                    />
                  ))}
                  {errors.fitId ? <Text variant="small" color="fail">{errors.fitId}</Text> : null}
                </View>
              )
            ) : (
              <View style={{ gap: space.s2 }}>
                {Array.from({ length: periods }, (_, k) => (
                  <TextField
                    key={k}
                    label={`Rate, period ${k + 1} (${data.data!.waves[k].label} to ${data.data!.waves[k + 1].label})`}
                    hint="Expected opportunities to change per actor in the period."
                    value={rateAt(k)}
                    onChangeText={(t) => setRates((prev) => Object.assign([...Array.from({ length: periods }, (_, i) => prev[i] ?? '2')], { [k]: t }))}
                    keyboardType="decimal-pad"
                    error={errors[`model.rates.${k}`]}
                    testID={`rate-${k + 1}`}
                  />
                ))}
                <Text variant="label">Effects</Text>
                {errors['model.effects'] ? <Text variant="small" color="fail">{errors['model.effects']}</Text> : null}
                {EFFECT_CATALOGUE.map((e) => {
                  const c = effectAt(e.id);
                  const usable = covariates.filter((cov) => e.covariate !== 'none' && cov.kind === e.covariate);
                  return (
                    <View key={e.id} style={{ gap: space.half }}>
                      <Checkbox
                        label={e.label}
                        hint={e.explanation}
                        checked={c.on}
                        disabled={e.covariate !== 'none' && usable.length === 0}
                        onChange={(on) => setEffect(e.id, { on, covariate: c.covariate ?? usable[0]?.name ?? null })}
                        testID={`effect-${e.id}`}
                      />
                      {c.on ? (
                        <View style={{ paddingLeft: 32, gap: space.s1 }}>
                          {e.covariate !== 'none' ? (
                            <SegmentedControl<string>
                              label="Covariate"
                              options={usable.map((cov) => ({ value: cov.name, label: cov.name }))}
                              value={c.covariate ?? usable[0]?.name ?? null}
                              onChange={(name) => setEffect(e.id, { covariate: name })}
                            />
                          ) : null}
                          <TextField
                            label={`Value of ${e.label.toLowerCase()}`}
                            value={c.value}
                            onChangeText={(t) => setEffect(e.id, { value: t })}
                            keyboardType="numbers-and-punctuation"
                            testID={`value-${e.id}`}
                          />
                        </View>
                      ) : null}
                    </View>
                  );
                })}
              </View>
            )}
          </Card>
          <Card title="Simulation">
            <TextField
              label="Chains"
              hint={`How many times to simulate each period: ${DEFAULT_CHAINS} is usual; 2 to ${MAX_CHAINS.toLocaleString('en-GB')}. With N chains no p-value below 1/(N+1) can be told apart.`}
              value={chains}
              onChangeText={setChains}
              keyboardType="number-pad"
              error={errors.chains}
              testID="batch-chains"
            />
            <TextField
              label="Seed"
              hint="Optional. The same seed gives the same results; left empty, one is drawn and shown with the batch."
              value={seed}
              onChangeText={setSeed}
              keyboardType="number-pad"
              error={errors.seed}
              testID="batch-seed"
            />
            <TextField label="Label" hint="Optional. Defaults to the batch number, chains and model." value={label} onChangeText={setLabel} error={errors.label} />
          </Card>
          <Card title="Statistics to compare">
            {errors.statistics ? <Text variant="small" color="fail">{errors.statistics}</Text> : null}
            {AUX_STATISTIC_CATALOGUE.map((s) => (
              <Checkbox
                key={s.id}
                label={s.label}
                hint={s.explanation}
                checked={statistics.includes(s.id)}
                onChange={(on) => setStatistics((prev) => (on ? [...prev, s.id] : prev.filter((x) => x !== s.id)))}
                testID={`statistic-${s.id}`}
              />
            ))}
          </Card>
          <ButtonRow>
            <Button label="Start batch" onPress={submit} loading={busy} testID="batch-start" />
            <Button label="Cancel" variant="secondary" href={`/studies/${studyId}/batches`} />
          </ButtonRow>
        </View>
      ) : null}
    </Screen>
  );
}
