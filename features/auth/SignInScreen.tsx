import { useRef, useState } from 'react';
import { View, type TextInput } from 'react-native';
import { loginBodySchema } from '../../shared/api';
import { messageOf } from '../api/client';
import { fieldErrorsFromApi, validateWith, type FieldErrors } from '../forms/validation';
import { Banner } from '../ui/Banner';
import { Button } from '../ui/Button';
import { Text } from '../ui/Text';
import { TextField } from '../ui/TextField';
import { space } from '../ui/tokens';
import { AuthFrame } from './AuthFrame';
import { useSession } from './session';

export function SignInScreen() {
  const session = useSession();
  const [email, setEmail] = useState('');
  const [password, setPassword] = useState('');
  const [errors, setErrors] = useState<FieldErrors>({});
  const [formError, setFormError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const passwordRef = useRef<TextInput>(null);

  const submit = async () => {
    if (busy) return;
    setFormError(null);
    const v = validateWith(loginBodySchema, { email, password });
    setErrors(v.errors);
    if (!v.ok) return;
    setBusy(true);
    try {
      // The sign-in route sees the new session and moves on (app/(auth)/sign-in.tsx).
      await session.signIn(v.data);
    } catch (e) {
      setErrors(fieldErrorsFromApi(e));
      setFormError(messageOf(e));
      setBusy(false);
    }
  };

  return (
    <AuthFrame title="Sign in" subtitle="Use the e-mail address your study lead invited.">
      <View style={{ gap: space.s2 }} role="form" accessibilityLabel="Sign in">
        {session.endedMessage && !formError ? (
          <Banner tone="info" word="Signed out" testID="session-ended">
            {session.endedMessage}
          </Banner>
        ) : null}
        {formError ? (
          <Banner tone="error" testID="sign-in-error">
            {formError}
          </Banner>
        ) : null}
        <TextField
          label="E-mail"
          value={email}
          onChangeText={setEmail}
          error={errors.email}
          autoCapitalize="none"
          autoCorrect={false}
          autoComplete="email"
          keyboardType="email-address"
          inputMode="email"
          returnKeyType="next"
          onSubmitEditing={() => passwordRef.current?.focus()}
          testID="sign-in-email"
        />
        <TextField
          ref={passwordRef}
          label="Password"
          value={password}
          onChangeText={setPassword}
          error={errors.password}
          secureTextEntry
          autoComplete="current-password"
          returnKeyType="go"
          onSubmitEditing={submit}
          testID="sign-in-password"
        />
        <Button label="Sign in" onPress={submit} loading={busy} block testID="sign-in-submit" />
        <Text variant="caption">
          New to a study? Open the invitation link in the e-mail from your study lead to set your password.
        </Text>
      </View>
    </AuthFrame>
  );
}
