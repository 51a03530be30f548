import { useLocalSearchParams, useRouter } from 'expo-router';
import { useState } from 'react';
import { View } from 'react-native';
import { acceptInvitationBodySchema } from '../../shared/api';
import { messageOf } from '../api/client';
import { AuthFrame } from '../auth/AuthFrame';
import { useSession } from '../auth/session';
import { fieldErrorsFromApi, validateWith, type FieldErrors } from '../forms/validation';
import { roleDescriptions, roleLabel, roleTones } from '../team/roles';
import { Badge } from '../ui/Badge';
import { Banner } from '../ui/Banner';
import { Button } from '../ui/Button';
import { formatDate } from '../ui/format';
import { Loading } from '../ui/Loading';
import { Text } from '../ui/Text';
import { TextField } from '../ui/TextField';
import { TextLink } from '../ui/TextLink';
import { colors } from '../ui/theme';
import { space } from '../ui/tokens';
import { acceptInvitation, useInvitation } from './queries';

export function InvitationScreen() {
  const params = useLocalSearchParams<{ token: string }>();
  const token = typeof params.token === 'string' && params.token.length > 0 ? params.token : null;
  const { data: preview, error, isLoading } = useInvitation(token);
  const session = useSession();
  const router = useRouter();
  const [name, setName] = useState('');
  const [password, setPassword] = useState('');
  const [errors, setErrors] = useState<FieldErrors>({});
  const [formError, setFormError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);

  if (!token || error) {
    const gone = error?.status === 410;
    return (
      <AuthFrame title={gone ? 'This invitation is closed' : 'Invitation not found'}>
        <Banner tone={gone ? 'caution' : 'error'}>
          {error?.message ?? 'The link is incomplete. Open it again from the e-mail.'}
        </Banner>
        <Text variant="muted">Ask your study lead for a new invitation, or sign in if you already have an account.</Text>
        <TextLink href="/sign-in">Go to sign in</TextLink>
      </AuthFrame>
    );
  }
  if (isLoading || !preview) {
    return (
      <AuthFrame title="Invitation">
        <Loading label="Opening the invitation…" />
      </AuthFrame>
    );
  }

  const submit = async () => {
    if (busy) return;
    setFormError(null);
    // An existing account keeps its name; the server ignores the field then.
    const v = validateWith(acceptInvitationBodySchema, { name: preview.accountExists ? preview.email : name, password });
    setErrors(v.errors);
    if (!v.ok) return;
    setBusy(true);
    try {
      const s = await acceptInvitation(token, v.data);
      await session.adopt(s);
      router.replace('/');
    } catch (e) {
      setErrors(fieldErrorsFromApi(e));
      setFormError(messageOf(e));
      setBusy(false);
    }
  };

  return (
    <AuthFrame title="Join a study" subtitle={`${preview.invitedBy} invited ${preview.email}.`}>
      <View style={{ gap: space.s1, padding: space.s2, borderRadius: 8, borderWidth: 1, borderColor: colors.rule, backgroundColor: colors.paper }}>
        <Text variant="overline">Study</Text>
        <Text variant="heading" testID="invitation-study">
          {preview.studyName}
        </Text>
        <View style={{ flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', gap: space.s1 }}>
          <Text variant="label">Your role</Text>
          <Badge label={roleLabel(preview.role)} tone={roleTones[preview.role]} />
        </View>
        <Text variant="caption">
          A {roleLabel(preview.role).toLowerCase()} {roleDescriptions[preview.role]}. The invitation is open until {formatDate(preview.expiresAt)}.
        </Text>
      </View>
      <View role="form" accessibilityLabel="Accept the invitation" style={{ gap: space.s2 }}>
        {formError ? <Banner tone="error">{formError}</Banner> : null}
        {preview.accountExists ? (
          <Text>
            You already have a Wavefit account as <Text variant="bodyStrong">{preview.email}</Text>. Enter its password to join.
          </Text>
        ) : (
          <TextField label="Your name" value={name} onChangeText={setName} error={errors.name} autoComplete="name" testID="invite-name" />
        )}
        <TextField
          label={preview.accountExists ? 'Password' : 'Choose a password'}
          hint={preview.accountExists ? undefined : 'At least 10 characters.'}
          value={password}
          onChangeText={setPassword}
          error={errors.password}
          secureTextEntry
          autoComplete={preview.accountExists ? 'current-password' : 'new-password'}
          onSubmitEditing={submit}
          testID="invite-password"
        />
        <Button label="Join the study" onPress={submit} loading={busy} block testID="invite-accept" />
      </View>
    </AuthFrame>
  );
}
