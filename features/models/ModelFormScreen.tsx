/**
 * The model form (new model, edit model): name and description, the periods with their rates, and
 * the effects (./EffectPicker.tsx); check against the data and save. Its state and pure logic are in
 * ./modelForm.ts.
 */
import { useLocalSearchParams, useRouter } from 'expo-router';
import { useEffect, useMemo, useState } from 'react';
import { View } from 'react-native';
import { can } from '../../shared/api';
import type { EffectId } from '../../shared/effects';
import { modelSpecBodySchema, type ModelNote } from '../../shared/models';
import { messageOf } from '../api/client';
import { parseId } from '../api/params';
import { fieldErrorsFromApi, validateWith, type FieldErrors } from '../forms/validation';
import { parseStudyId, useStudy, useStudyData } from '../studies/queries';
import { StudyNotFound } from '../studies/StudyNotFound';
import { Banner } from '../ui/Banner';
import { Button, ButtonRow } from '../ui/Button';
import { Card } from '../ui/Card';
import { Checkbox } from '../ui/Checkbox';
import { Loading, LoadError } from '../ui/Loading';
import { Screen } from '../ui/Screen';
import { TextField } from '../ui/TextField';
import { TextLink } from '../ui/TextLink';
import { colors } from '../ui/theme';
import { space } from '../ui/tokens';
import { EffectPicker } from './EffectPicker';
import { buildBody, initialEffects, initialRates, messagesFor, type EffectRow, type RateRow, type RowMessages } from './modelForm';
import { ParameterControls, RowNotes } from './ParameterControls';
import { useModel, useModelMutations } from './queries';

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

          <EffectPicker
            grouped={grouped}
            covariates={data.data!.covariates}
            messages={messages}
            onChange={setEffect}
          />

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
