import { useFonts } from 'expo-font';
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
  // The mono faces for figures (tables, charts): only the signed-in area uses them (see app/_layout.tsx).
  const [monoLoaded, monoError] = useFonts({
    'PlexMono-Regular': require('../../fonts/IBMPlexMono_400Regular.ttf'),
    'PlexMono-Medium': require('../../fonts/IBMPlexMono_500Medium.ttf'),
  });
  const monoReady = monoLoaded || !!monoError;
  useEffect(() => {
    if (!signedOut) return;
    // Come back here after signing in. Once per signed-out spell: the router passes through
    // other paths on its way to /sign-in, and those must not overwrite the page asked for.
    if (pathname !== '/') rememberReturnPath(pathname);
    router.replace('/sign-in');
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [signedOut]);
  let cover: React.ReactNode = null;
  if (session.status === 'loading' || signedOut || !monoReady) cover = <Loading label="Opening Wavefit…" fill />;
  else if (session.status === 'error') {
    cover = (
      <View style={{ flex: 1, backgroundColor: colors.paper, padding: space.s3, justifyContent: 'center' }}>
        <LoadError message={session.error?.message ?? 'Cannot check your session.'} onRetry={() => void session.refresh()} />
      </View>
    );
  }
  // The route's navigator stays mounted (hidden) while the session is checked, so the router
  // keeps the nested route the visitor asked for.
  return <AppShell cover={cover}>{children}</AppShell>;
}
