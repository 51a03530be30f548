import { Redirect, useLocalSearchParams } from 'expo-router';
import { useEffect } from 'react';
import { afterSignInPath, forgetReturnPath, useSession } from '../../features/auth/session';
import { SignInScreen } from '../../features/auth/SignInScreen';

export default function SignInRoute() {
  const { status } = useSession();
  const { next } = useLocalSearchParams<{ next?: string }>();
  const signedIn = status === 'signed-in';
  useEffect(() => () => {
    if (signedIn) forgetReturnPath();
  }, [signedIn]);
  if (signedIn) return <Redirect href={afterSignInPath(next)} />;
  return <SignInScreen />;
}
