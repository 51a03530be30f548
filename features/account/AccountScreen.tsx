import { useRouter } from 'expo-router';
import { useState } from 'react';
import { View } from 'react-native';
import { changePasswordBodySchema } from '../../shared/api';
import { messageOf } from '../api/client';
import { forgetReturnPath, useSession } from '../auth/session';
import { fieldErrorsFromApi, validateWith, type FieldErrors } from '../forms/validation';
import { NotificationPreferences } from '../inbox/NotificationPreferences';
import { Badge } from '../ui/Badge';
import { Banner } from '../ui/Banner';
import { Button } from '../ui/Button';
import { Card } from '../ui/Card';
import { Screen, Section } from '../ui/Screen';
import { Text } from '../ui/Text';
import { TextField } from '../ui/TextField';
import { space } from '../ui/tokens';

function ChangePasswordForm() {
  const { changePassword } = useSession();
  const [currentPassword, setCurrent] = useState('');
  const [newPassword, setNew] = useState('');
  const [repeat, setRepeat] = useState('');
  const [errors, setErrors] = useState<FieldErrors>({});
  const [formError, setFormError] = useState<string | null>(null);
  const [done, setDone] = useState(false);
  const [busy, setBusy] = useState(false);

  const submit = async () => {
    if (busy) return;
    setFormError(null);
    setDone(false);
    const v = validateWith(changePasswordBodySchema, { currentPassword, newPassword });
    const errs: FieldErrors = { ...v.errors };
    if (!errs.newPassword && repeat !== newPassword) errs.repeat = 'The two new passwords differ.';
    setErrors(errs);
    if (!v.ok || errs.repeat) return;
    setBusy(true);
    try {
      await changePassword(v.data);
      setDone(true);
      setCurrent('');
      setNew('');
      setRepeat('');
    } catch (e) {
      setErrors(fieldErrorsFromApi(e));
      setFormError(messageOf(e));
    } finally {
      setBusy(false);
    }
  };

  return (
    <Card>
      <View role="form" accessibilityLabel="Change password" style={{ gap: space.s2 }}>
        {done ? <Banner tone="success">Your password is changed. Every other session of this account has ended; this one goes on.</Banner> : null}
        {formError ? <Banner tone="error">{formError}</Banner> : null}
        <TextField label="Current password" value={currentPassword} onChangeText={setCurrent} error={errors.currentPassword} secureTextEntry autoComplete="current-password" />
        <TextField
          label="New password"
          hint="At least 10 characters."
          value={newPassword}
          onChangeText={setNew}
          error={errors.newPassword}
          secureTextEntry
          autoComplete="new-password"
        />
        <TextField label="New password again" value={repeat} onChangeText={setRepeat} error={errors.repeat} secureTextEntry autoComplete="new-password" onSubmitEditing={submit} />
        <Button label="Change password" onPress={submit} loading={busy} />
      </View>
    </Card>
  );
}

function SignOutEverywhere() {
  const { signOutEverywhere } = useSession();
  const router = useRouter();
  const [busy, setBusy] = useState(false);
  const [error, setError] = useState<string | null>(null);
  return (
    <Card>
      <View style={{ gap: space.s2 }}>
        <Text>
          Ends every session of this account: on this browser and on any other computer or phone where you are signed in.
          Use it when you signed in on a shared computer or think someone else has your session.
        </Text>
        {error ? <Banner tone="error">{error}</Banner> : null}
        <Button
          label="Sign out everywhere"
          icon="signOut"
          variant="secondary"
          loading={busy}
          onPress={async () => {
            setBusy(true);
            setError(null);
            try {
              await signOutEverywhere();
              forgetReturnPath();
              router.replace('/sign-in');
            } catch (e) {
              setError(messageOf(e));
              setBusy(false);
            }
          }}
        />
      </View>
    </Card>
  );
}

export function AccountScreen() {
  const { user, signOut } = useSession();
  const router = useRouter();
  const [leaving, setLeaving] = useState(false);
  return (
    <Screen title="Account" narrow>
      {user ? (
        <Card title="Signed in as">
          <View style={{ gap: space.half }}>
            <Text variant="heading">{user.name}</Text>
            <Text variant="muted">{user.email}</Text>
            {user.isAdmin ? <Badge label="Site administrator" tone="accent" /> : null}
          </View>
          <Button
            label="Sign out"
            icon="signOut"
            variant="secondary"
            loading={leaving}
            onPress={async () => {
              setLeaving(true);
              try {
                await signOut();
              } finally {
                // The next person to sign in here starts at their studies, not at this account page.
                forgetReturnPath();
                router.replace('/sign-in');
              }
            }}
          />
        </Card>
      ) : null}
      <Section title="Change password">
        <ChangePasswordForm />
      </Section>
      <Section title="Sessions">
        <SignOutEverywhere />
      </Section>
      <Section title="Notifications">
        <NotificationPreferences />
      </Section>
    </Screen>
  );
}
