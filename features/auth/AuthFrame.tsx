import Head from 'expo-router/head';
import { ScrollView, View } from 'react-native';
import { useSafeAreaInsets } from 'react-native-safe-area-context';
import { Heading, Text } from '../ui/Text';
import { colors } from '../ui/theme';
import { space } from '../ui/tokens';
import { useBreakpoint } from '../ui/useBreakpoint';
import { Wordmark } from '../ui/Wordmark';
import { EnvelopeSketch } from './EnvelopeSketch';

const tagline = 'Fit models of how a network changes between panel waves, simulate them many times, and review the fit as a team.';

/** The frame of the signed-out pages: a calm panel with the wordmark beside (or above) a form. */
export function AuthFrame({ title, subtitle, children }: { title: string; subtitle?: string; children: React.ReactNode }) {
  const { compact, breakpoint } = useBreakpoint();
  const insets = useSafeAreaInsets();
  const form = (
    <View style={{ width: '100%', maxWidth: 420, alignSelf: 'center', gap: space.s3 }}>
      <View style={{ gap: space.half }}>
        <Heading level={1}>{title}</Heading>
        {subtitle ? <Text variant="muted">{subtitle}</Text> : null}
      </View>
      {children}
    </View>
  );
  return (
    <View style={{ flex: 1, backgroundColor: colors.paper }}>
      <Head>
        <title>{`${title} · Wavefit`}</title>
      </Head>
      {compact ? (
        <ScrollView
          contentContainerStyle={{ paddingTop: insets.top + space.s3, paddingBottom: space.s6, paddingHorizontal: space.s2, gap: space.s4 }}
          keyboardShouldPersistTaps="handled"
        >
          <View style={{ gap: space.s1 }}>
            <Wordmark />
            <Text variant="muted">{tagline}</Text>
          </View>
          <View role="main" style={{ backgroundColor: colors.surface, borderColor: colors.rule, borderWidth: 1, borderRadius: 8, padding: space.s2 }}>
            {form}
          </View>
        </ScrollView>
      ) : (
        <View style={{ flex: 1, flexDirection: 'row' }}>
          <View
            style={{
              flex: breakpoint === 'wide' ? 5 : 4,
              backgroundColor: colors.surfaceSunk,
              borderRightWidth: 1,
              borderRightColor: colors.rule,
              padding: space.s6,
              justifyContent: 'space-between',
            }}
          >
            <Wordmark size="large" />
            <View style={{ gap: space.s3, maxWidth: 440 }}>
              <EnvelopeSketch width={breakpoint === 'wide' ? 380 : 280} />
              <Text variant="lead" style={{ color: colors.ink }}>
                {tagline}
              </Text>
            </View>
            <Text variant="caption">Harbourside demo data are invented; no real people appear in them.</Text>
          </View>
          <ScrollView
            role="main"
            style={{ flex: breakpoint === 'wide' ? 6 : 5 }}
            contentContainerStyle={{ flexGrow: 1, justifyContent: 'center', padding: space.s6 }}
            keyboardShouldPersistTaps="handled"
          >
            {form}
          </ScrollView>
        </View>
      )}
    </View>
  );
}
