import { useLocalSearchParams, useRouter } from 'expo-router';
import { useEffect, useMemo, useState } from 'react';
import { View } from 'react-native';
import { can } from '../../shared/api';
import type { CovariateInfo, StudyDataResponse } from '../../shared/data';
import { EFFECT_CATALOGUE, type EffectId, type EffectInfo } from '../../shared/effects';
import { modelSpecBodySchema, type ModelDetail, type ModelNote, type ModelSpecBody } from '../../shared/models';
import { messageOf } from '../api/client';
import { fieldErrorsFromApi, validateWith, type FieldErrors } from '../forms/validation';
import { parseStudyId, useStudy, useStudyData } from '../studies/queries';
import { StudyNotFound } from '../studies/StudyNotFound';
import { Banner } from '../ui/Banner';
import { Button, ButtonRow } from '../ui/Button';
import { Card } from '../ui/Card';
import { Icon } from '../ui/icons';
import { Loading, LoadError } from '../ui/Loading';
import { Screen } from '../ui/Screen';
import { SegmentedControl } from '../ui/SegmentedControl';
import { Text } from '../ui/Text';
import { TextField } from '../ui/TextField';
import { TextLink } from '../ui/TextLink';
import { colors } from '../ui/theme';
import { space } from '../ui/tokens';
import { useBreakpoint } from '../ui/useBreakpoint';
import { Checkbox } from '../ui/Checkbox';
import { parseId } from '../api/params';
import { useModel, useModelMutations } from './queries';

type Mode = 'estimate' | 'fix';

interface RateRow {
  period: number;
  included: boolean;
  mode: Mode;
  value: string;
}

interface EffectRow {
  key: string;
  id: EffectId;
  covariate?: string;
  included: boolean;
  mode: Mode;
  value: string;
}

/** Messages per form row ("rate:1", "density", "covariate_alter:age") and for the form as a whole. */
interface RowMessages {
  byRow: Record<string, { text: string; severity: 'error' | 'warning' }[]>;
  general: { text: string; severity: 'error' | 'warning' }[];
}

const rowKeyOf = (id: string, covariate?: string) => (covariate ? `${id}:${covariate}` : id);
const toNumber = (s: string): number => Number(s.trim().replace(',', '.').replace('\u2212', '-'));

/** The effect rows the study's covariates allow: one per structural effect, one per usable covariate. */
function effectRowsFor(covariates: CovariateInfo[]): { info: EffectInfo; covariate?: string }[] {
  const out: { info: EffectInfo; covariate?: string }[] = [];
  for (const info of EFFECT_CATALOGUE) {
    if (info.covariate === 'none') out.push({ info });
    else for (const c of covariates.filter((cov) => cov.kind === info.covariate)) out.push({ info, covariate: c.name });
  }
  return out;
}

function initialRates(data: StudyDataResponse, model: ModelDetail | undefined): RateRow[] {
  const periods = Math.max(0, data.waves.length - 1);
  return Array.from({ length: periods }, (_, k) => {
    const r = model?.rates.find((x) => x.period === k + 1);
    if (model) return { period: k + 1, included: !!r, mode: r && !r.estimate ? 'fix' : 'estimate', value: r?.value != null ? String(r.value) : '' };
    return { period: k + 1, included: true, mode: 'estimate', value: '' };
  });
}

function initialEffects(data: StudyDataResponse, model: ModelDetail | undefined): EffectRow[] {
  return effectRowsFor(data.covariates).map(({ info, covariate }) => {
    const key = rowKeyOf(info.id, covariate);
    const e = model?.effects.find((x) => x.key === key);
    if (model) return { key, id: info.id, covariate, included: !!e, mode: e && !e.estimate ? 'fix' : 'estimate', value: e?.value != null ? String(e.value) : '' };
    return { key, id: info.id, covariate, included: info.id === 'density' || info.id === 'reciprocity', mode: 'estimate', value: '' };
  });
}

/** The body the form stands for, and which row each body position came from. */
function buildBody(name: string, description: string, rates: RateRow[], effects: EffectRow[]) {
  const rateRows = rates.filter((r) => r.included);
  const effectRows = effects.filter((e) => e.included);
  const body: ModelSpecBody = {
    name,
    description,
    rates: rateRows.map((r) => ({
      period: r.period,
      estimate: r.mode === 'estimate',
      ...(r.value.trim() !== '' || r.mode === 'fix' ? { value: r.value.trim() === '' ? undefined : toNumber(r.value) } : {}),
    })),
    effects: effectRows.map((e) => ({
      id: e.id,
      ...(e.covariate ? { covariate: e.covariate } : {}),
      estimate: e.mode === 'estimate',
      ...(e.value.trim() !== '' ? { value: toNumber(e.value) } : {}),
    })),
  };
  return { body, rateKeys: rateRows.map((r) => `rate:${r.period}`), effectKeys: effectRows.map((e) => e.key) };
}

/** Sorts messages keyed by body path ("effects.2.covariate") onto the form rows. */
function messagesFor(
  entries: { path: string; text: string; severity: 'error' | 'warning' }[],
  rateKeys: string[],
  effectKeys: string[],
): RowMessages {
  const out: RowMessages = { byRow: {}, general: [] };
  for (const { path, text, severity } of entries) {
    const m = /^(rates|effects)\.(\d+)/.exec(path);
    const key = m ? (m[1] === 'rates' ? rateKeys : effectKeys)[Number(m[2])] : undefined;
    if (key) (out.byRow[key] ??= []).push({ text, severity });
    else if (path === 'rates' || path === 'effects') (out.byRow[`__${path}`] ??= []).push({ text, severity });
    else if (path !== 'name' && path !== 'description') out.general.push({ text, severity });
  }
  return out;
}

function RowNotes({ notes }: { notes?: { text: string; severity: 'error' | 'warning' }[] }) {
  if (!notes?.length) return null;
  return (
    <View style={{ gap: space.half }}>
      {notes.map((n, i) => (
        <View key={i} style={{ flexDirection: 'row', gap: space.half, alignItems: 'flex-start' }}>
          <View style={{ paddingTop: 2 }}>
            <Icon name={n.severity === 'error' ? 'error' : 'caution'} size={16} color={n.severity === 'error' ? colors.fail : colors.unsure} />
          </View>
          <Text variant="small" style={{ flex: 1, color: n.severity === 'error' ? colors.fail : colors.unsure }} aria-live="polite">
            <Text variant="label" style={{ color: n.severity === 'error' ? colors.fail : colors.unsure }}>
              {n.severity === 'error' ? 'Problem: ' : 'Caution: '}
            </Text>
            {n.text}
          </Text>
        </View>
      ))}
    </View>
  );
}

/** Estimate or fix, with the value field beside it. */
function ParameterControls({
  what,
  mode,
  value,
  onMode,
  onValue,
  valueHint,
  testID,
}: {
  what: string;
  mode: Mode;
  value: string;
  onMode: (m: Mode) => void;
  onValue: (v: string) => void;
  valueHint: string;
  testID: string;
}) {
  const { compact } = useBreakpoint();
  return (
    <View style={{ flexDirection: compact ? 'column' : 'row', gap: space.s2, alignItems: compact ? 'stretch' : 'flex-end' }}>
      <SegmentedControl<Mode>
        label={`${what}: estimate or fix`}
        hideLabel
        options={[
          { value: 'estimate', label: 'Estimate', description: 'the fit finds its value' },
          { value: 'fix', label: 'Fix', description: 'keep the value you enter' },
        ]}
        value={mode}
        onChange={onMode}
      />
      <View style={{ flexGrow: 1, flexBasis: compact ? 'auto' : 200 }}>
        <TextField
          label={mode === 'estimate' ? 'Starting value (optional)' : 'Value'}
          hint={valueHint}
          value={value}
          onChangeText={onValue}
          keyboardType="numbers-and-punctuation"
          accessibilityHint={`${what}`}
          testID={testID}
        />
      </View>
    </View>
  );
}

export function ModelFormScreen() {
  const params = useLocalSearchParams<{ studyId: string; modelId?: string }>();
  const studyId = parseStudyId(params.studyId);
  const modelId = parseId(params.modelId);
  const editing = params.modelId !== undefined;
  const router = useRouter();
  const study = useStudy(studyId);
  const data = useStudyData(studyId);
  const existing = useModel(editing ? studyId : null, modelId);
  const { create, update, check } = useModelMutations(studyId ?? 0);

  const [name, setName] = useState('');
  const [description, setDescription] = useState('');
  const [rates, setRates] = useState<RateRow[] | null>(null);
  const [effects, setEffects] = useState<EffectRow[] | null>(null);
  const [errors, setErrors] = useState<FieldErrors>({});
  const [messages, setMessages] = useState<RowMessages>({ byRow: {}, general: [] });
  const [formError, setFormError] = useState<string | null>(null);
  const [checked, setChecked] = useState<string | null>(null);
  const [busy, setBusy] = useState<'save' | 'check' | null>(null);

  const model = existing.data?.model;
  const ready = data.data && (!editing || model);
  useEffect(() => {
    if (!ready || rates !== null) return;
    setRates(initialRates(data.data!, model));
    setEffects(initialEffects(data.data!, model));
    setName(model?.name ?? '');
    setDescription(model?.description ?? '');
  }, [ready, rates, data.data, model]);

  const grouped = useMemo(() => {
    const map = new Map<EffectId, EffectRow[]>();
    for (const row of effects ?? []) map.set(row.id, [...(map.get(row.id) ?? []), row]);
    return map;
  }, [effects]);

  if (studyId === null || (editing && modelId === null) || study.error?.status === 404 || existing.error?.status === 404) return <StudyNotFound />;
  const role = study.data?.study.myRole;
  const back = editing ? `/studies/${studyId}/models/${modelId}` : `/studies/${studyId}/models`;
  const title = editing ? `Edit ${model?.name ?? 'model'}` : 'New model';

  if (study.data && !can(role, 'editModels')) {
    return (
      <Screen title={title} narrow above={<TextLink href={back}>← Back</TextLink>}>
        <Banner tone="info">Only a lead or statistician of this study can change models; your role is {role ?? 'none'}.</Banner>
      </Screen>
    );
  }

  const setRate = (period: number, change: Partial<RateRow>) =>
    setRates((prev) => prev!.map((r) => (r.period === period ? { ...r, ...change } : r)));
  const setEffect = (key: string, change: Partial<EffectRow>) =>
    setEffects((prev) => prev!.map((e) => (e.key === key ? { ...e, ...change } : e)));

  const current = () => buildBody(name.trim(), description.trim(), rates ?? [], effects ?? []);

  const runCheck = async () => {
    if (busy) return;
    const { body, rateKeys, effectKeys } = current();
    const v = validateWith(modelSpecBodySchema, { ...body, name: body.name || 'unsaved' });
    setErrors(v.errors);
    setFormError(null);
    if (!v.ok) {
      setMessages(messagesFor(Object.entries(v.errors).map(([path, text]) => ({ path, text, severity: 'error' as const })), rateKeys, effectKeys));
      setChecked('Some entries need a look before the data can be checked; the messages are beside them.');
      return;
    }
    setBusy('check');
    try {
      const notes: ModelNote[] = await check({ ...body, name: body.name || 'unsaved' });
      setMessages(messagesFor(notes.map((n) => ({ path: n.path, text: n.message, severity: n.severity })), rateKeys, effectKeys));
      const errs = notes.filter((n) => n.severity === 'error').length;
      const warns = notes.length - errs;
      setChecked(
        errs === 0 && warns === 0
          ? 'The data suit this model: every estimated parameter has something to go on.'
          : `${errs} problem${errs === 1 ? '' : 's'} and ${warns} caution${warns === 1 ? '' : 's'}; they are shown beside the parameters.`,
      );
    } catch (e) {
      setFormError(messageOf(e));
    } finally {
      setBusy(null);
    }
  };

  const save = async () => {
    if (busy) return;
    setFormError(null);
    setChecked(null);
    const { body, rateKeys, effectKeys } = current();
    const v = validateWith(modelSpecBodySchema, body);
    setErrors(v.errors);
    setMessages(messagesFor(Object.entries(v.errors).map(([path, text]) => ({ path, text, severity: 'error' as const })), rateKeys, effectKeys));
    if (!v.ok) {
      setFormError('Some entries need a look; the messages are beside them.');
      return;
    }
    setBusy('save');
    try {
      const saved = editing ? await update(modelId!, body) : await create(body);
      router.replace(`/studies/${studyId}/models/${saved.id}`);
    } catch (e) {
      const fields = fieldErrorsFromApi(e);
      setErrors(fields);
      setMessages(messagesFor(Object.entries(fields).map(([path, text]) => ({ path, text, severity: 'error' as const })), rateKeys, effectKeys));
      setFormError(messageOf(e));
      setBusy(null);
    }
  };

  const covariatesOfKind = (kind: 'numeric' | 'categorical') => (data.data?.covariates ?? []).filter((c) => c.kind === kind);

  return (
    <Screen
      overline="Model"
      title={title}
      subtitle="Choose the periods to fit and the effects that drive the actors' choices; each parameter is estimated or fixed at a value."
      narrow
      above={<TextLink href={back}>← Back</TextLink>}
      testID="model-form"
    >
      {data.error ? <LoadError message={data.error.message} onRetry={() => void data.mutate()} /> : null}
      {!ready || rates === null || effects === null ? <Loading label="Loading the study data…" /> : null}
      {data.data && !data.data.hasData ? <Banner tone="caution">This study has no data yet: upload at least two waves before making a model.</Banner> : null}
      {ready && data.data?.hasData && rates && effects ? (
        <View role="form" accessibilityLabel={title} style={{ gap: space.s3 }}>
          {formError ? <Banner tone="error">{formError}</Banner> : null}
          {messages.general.length ? <RowNotes notes={messages.general} /> : null}
          <Card title="About">
            <TextField label="Name" required value={name} onChangeText={setName} error={errors.name} testID="model-name" />
            <TextField
              label="Description"
              hint="Optional: what this model is for."
              value={description}
              onChangeText={setDescription}
              multiline
              error={errors.description}
              testID="model-description"
            />
          </Card>

          <Card title="Periods and rates" subtitle="A period runs from one wave to the next. Its rate is how many chances to change each actor gets in it.">
            {rates.map((r) => {
              const change = data.data!.changes.find((c) => c.from === r.period);
              const waves = data.data!.waves;
              const key = `rate:${r.period}`;
              return (
                <View key={key} style={{ gap: space.s1, paddingBottom: space.s1, borderBottomWidth: 1, borderBottomColor: colors.rule }}>
                  <Checkbox
                    label={`Period ${r.period}: ${waves[r.period - 1].label} to ${waves[r.period].label}`}
                    hint={
                      change
                        ? `${change.created} ties made, ${change.dissolved} ended${change.jaccard != null ? `, ${Math.round(change.jaccard * 100)}% of ties kept` : ''}.${change.caution ? ` ${change.caution}` : ''}`
                        : undefined
                    }
                    checked={r.included}
                    onChange={(included) => setRate(r.period, { included })}
                    testID={`period-${r.period}`}
                  />
                  {r.included ? (
                    <View style={{ paddingLeft: 30 }}>
                      <ParameterControls
                        what={`Rate of period ${r.period}`}
                        mode={r.mode}
                        value={r.value}
                        onMode={(mode) => setRate(r.period, { mode })}
                        onValue={(value) => setRate(r.period, { value })}
                        valueHint={r.mode === 'estimate' ? 'Left empty, the fit starts from the rate the observed change suggests.' : 'Greater than 0.'}
                        testID={`rate-value-${r.period}`}
                      />
                    </View>
                  ) : null}
                  <RowNotes notes={messages.byRow[key]} />
                </View>
              );
            })}
            <RowNotes notes={messages.byRow.__rates} />
          </Card>

          <Card title="Effects" subtitle="What makes an actor add or drop a tie. A model needs at least density.">
            <RowNotes notes={messages.byRow.__effects} />
            {EFFECT_CATALOGUE.map((info) => {
              const rows = grouped.get(info.id) ?? [];
              const needs = info.covariate;
              return (
                <View key={info.id} style={{ gap: space.s1, paddingBottom: space.s1, borderBottomWidth: 1, borderBottomColor: colors.rule }} testID={`effect-group-${info.id}`}>
                  {needs === 'none' ? null : (
                    <View style={{ gap: 2 }}>
                      <Text variant="bodyStrong">{info.label}</Text>
                      <Text variant="caption">{info.explanation}</Text>
                      {covariatesOfKind(needs).length === 0 ? (
                        <Text variant="caption" style={{ fontStyle: 'italic' }}>
                          This study has no {needs} covariate, so this effect cannot be used.
                        </Text>
                      ) : (
                        <Text variant="caption">Choose the {needs} covariates to use it with:</Text>
                      )}
                    </View>
                  )}
                  {rows.map((row) => (
                    <View key={row.key} style={{ gap: space.s1, paddingLeft: needs === 'none' ? 0 : space.s2 }}>
                      <Checkbox
                        label={needs === 'none' ? info.label : `with ${row.covariate}`}
                        hint={needs === 'none' ? info.explanation : undefined}
                        checked={row.included}
                        onChange={(included) => setEffect(row.key, { included })}
                        testID={`effect-${row.key}`}
                      />
                      {row.included ? (
                        <View style={{ paddingLeft: 30 }}>
                          <ParameterControls
                            what={needs === 'none' ? info.label : `${info.label} with ${row.covariate}`}
                            mode={row.mode}
                            value={row.value}
                            onMode={(mode) => setEffect(row.key, { mode })}
                            onValue={(value) => setEffect(row.key, { value })}
                            valueHint={
                              row.mode === 'estimate'
                                ? row.id === 'density'
                                  ? 'Left empty, the fit starts from the observed density.'
                                  : 'Left empty, the fit starts from 0.'
                                : `Between \u221240 and 40.`
                            }
                            testID={`effect-value-${row.key}`}
                          />
                        </View>
                      ) : null}
                      <RowNotes notes={messages.byRow[row.key]} />
                    </View>
                  ))}
                </View>
              );
            })}
          </Card>

          {checked ? <Banner tone={messages.general.some((m) => m.severity === 'error') || Object.values(messages.byRow).flat().some((m) => m.severity === 'error') ? 'caution' : 'info'}>{checked}</Banner> : null}
          <ButtonRow>
            <Button label={editing ? 'Save changes' : 'Save model'} onPress={save} loading={busy === 'save'} testID="model-save" />
            <Button label="Check against the data" variant="secondary" onPress={runCheck} loading={busy === 'check'} testID="model-check" />
            <Button label="Cancel" variant="quiet" href={back} />
          </ButtonRow>
        </View>
      ) : null}
    </Screen>
  );
}
