import '../features/api/zodJitless';
import { useFonts } from 'expo-font';
import { Slot } from 'expo-router';
import { StatusBar } from 'expo-status-bar';
import { View } from 'react-native';
import { SafeAreaProvider } from 'react-native-safe-area-context';
import { SWRConfig } from 'swr';
import { swrOptions } from '../features/api/swr';
import { SessionProvider } from '../features/auth/session';
import { colors } from '../features/ui/theme';

export default function RootLayout() {
  // The shipped font files (fonts/, OFL); nothing is fetched from a font host. Only the text faces
  // here: the signed-out pages (sign-in, invitation) show no figures, so the mono faces for numbers
  // are loaded by the signed-in gate (features/shell/SignedInGate.tsx), keeping the first page light.
  const [loaded, error] = useFonts({
    'Atkinson-Regular': require('../fonts/AtkinsonHyperlegible_400Regular.ttf'),
    'Atkinson-Bold': require('../fonts/AtkinsonHyperlegible_700Bold.ttf'),
  });
  // The navigator is mounted from the first render (the router resolves nested routes only
  // through mounted navigators); until the faces are ready the page stays invisible.
  const ready = loaded || !!error;
  return (
    <SafeAreaProvider style={{ backgroundColor: colors.paper }}>
      <SWRConfig value={swrOptions}>
        <SessionProvider>
          <StatusBar style="dark" />
          <View style={{ flex: 1, backgroundColor: colors.paper, opacity: ready ? 1 : 0 }}>
            <Slot />
          </View>
        </SessionProvider>
      </SWRConfig>
    </SafeAreaProvider>
  );
}
