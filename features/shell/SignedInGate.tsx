import { usePathname, useRouter } from 'expo-router';
import { useEffect } from 'react';
import { View } from 'react-native';
import { rememberReturnPath, useSession } from '../auth/session';
import { Loading, LoadError } from '../ui/Loading';
import { colors } from '../ui/theme';
import { space } from '../ui/tokens';
import { AppShell } from './AppShell';

/** Shows the signed-in area only to a signed-in user; anyone else goes to sign-in (and comes back). */
export function SignedInGate({ children }: { children: React.ReactNode }) {
  const session = useSession();
  const pathname = usePathname() || '/';
  const router = useRouter();
  const signedOut = session.status === 'signed-out';
  useEffect(() => {
    if (!signedOut) return;
    // Come back here after signing in. Once per signed-out spell: the router passes through
    // other paths on its way to /sign-in, and those must not overwrite the page asked for.
    console.log('[dbg] gate remember', pathname); if (pathname !== '/') rememberReturnPath(pathname);
    router.replace('/sign-in');
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [signedOut]);
  if (session.status === 'loading' || signedOut) return <Loading label="Opening Wavefit…" fill />;
  if (session.status === 'error') {
    return (
      <View style={{ flex: 1, backgroundColor: colors.paper, padding: space.s3, justifyContent: 'center' }}>
        <LoadError message={session.error?.message ?? 'Cannot check your session.'} onRetry={() => void session.refresh()} />
      </View>
    );
  }
  return <AppShell>{children}</AppShell>;
}
