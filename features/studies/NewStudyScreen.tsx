import { useRouter } from 'expo-router';
import { useState } from 'react';
import { View } from 'react-native';
import { createStudyBodySchema } from '../../shared/api';
import { messageOf } from '../api/client';
import { fieldErrorsFromApi, validateWith, type FieldErrors } from '../forms/validation';
import { Banner } from '../ui/Banner';
import { Button, ButtonRow } from '../ui/Button';
import { Card } from '../ui/Card';
import { Screen } from '../ui/Screen';
import { TextField } from '../ui/TextField';
import { space } from '../ui/tokens';
import { useStudyMutations } from './queries';

export function NewStudyScreen() {
  const router = useRouter();
  const { create } = useStudyMutations();
  const [name, setName] = useState('');
  const [description, setDescription] = useState('');
  const [errors, setErrors] = useState<FieldErrors>({});
  const [formError, setFormError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);

  const submit = async () => {
    if (busy) return;
    setFormError(null);
    const v = validateWith(createStudyBodySchema, { name, description });
    setErrors(v.errors);
    if (!v.ok) return;
    setBusy(true);
    try {
      const study = await create(v.data);
      router.replace(`/studies/${study.id}`);
    } catch (e) {
      setErrors(fieldErrorsFromApi(e));
      setFormError(messageOf(e));
      setBusy(false);
    }
  };

  return (
    <Screen title="New study" subtitle="You become the study's lead and can invite the rest of the team." narrow>
      <Card>
        <View role="form" accessibilityLabel="New study" style={{ gap: space.s2 }}>
          {formError ? <Banner tone="error">{formError}</Banner> : null}
          <TextField
            label="Name"
            hint="3 to 120 characters, for example “Crew advice ties 2024”."
            value={name}
            onChangeText={setName}
            error={errors.name}
            required
            testID="study-name"
          />
          <TextField
            label="Description"
            hint="Optional. What the network is and when the waves were observed."
            value={description}
            onChangeText={setDescription}
            error={errors.description}
            multiline
            numberOfLines={4}
            testID="study-description"
          />
          <ButtonRow>
            <Button label="Create study" onPress={submit} loading={busy} testID="study-create" />
            <Button label="Cancel" variant="secondary" onPress={() => (router.canGoBack() ? router.back() : router.replace('/'))} />
          </ButtonRow>
        </View>
      </Card>
    </Screen>
  );
}
