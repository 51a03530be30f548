import Head from 'expo-router/head';
import { ScrollView, View } from 'react-native';
import { useSafeAreaInsets } from 'react-native-safe-area-context';
import { Heading, Text } from './Text';
import { colors } from './theme';
import { layout, space } from './tokens';
import { useBreakpoint } from './useBreakpoint';

export interface ScreenProps {
  /** The screen's heading and the browser tab title. */
  title?: string;
  /** A small line above the title ("Study", "Team"). */
  overline?: string;
  /** A line under the title. */
  subtitle?: string;
  /** Buttons beside the title on a wide screen, below it on a phone. */
  actions?: React.ReactNode;
  /** Something above the title, such as a back link. */
  above?: React.ReactNode;
  /** Narrow column for forms (560 px). */
  narrow?: boolean;
  children?: React.ReactNode;
  testID?: string;
}

/**
 * A scrolling page: safe-area aware, page gutters from the breakpoint, content centred in a
 * column no wider than 1100 px on a wide screen.
 */
export function Screen({ title, overline, subtitle, actions, above, narrow, children, testID }: ScreenProps) {
  const insets = useSafeAreaInsets();
  const { gutter, compact } = useBreakpoint();
  return (
    <ScrollView
      testID={testID}
      style={{ flex: 1, backgroundColor: colors.paper }}
      contentContainerStyle={{
        paddingTop: (compact ? space.s2 : space.s4) + (compact ? 0 : insets.top),
        paddingBottom: space.s6,
        paddingLeft: gutter + insets.left,
        paddingRight: gutter + insets.right,
      }}
      keyboardShouldPersistTaps="handled"
    >
      {title ? (
        <Head>
          <title>{`${title} · Wavefit`}</title>
        </Head>
      ) : null}
      <View style={{ width: '100%', maxWidth: narrow ? 560 : layout.maxContentWidth, alignSelf: 'center', gap: space.s3 }}>
        {above}
        {title ? (
          <View
            style={{
              flexDirection: compact ? 'column' : 'row',
              alignItems: compact ? 'stretch' : 'flex-end',
              justifyContent: 'space-between',
              gap: space.s2,
            }}
          >
            <View style={{ flexShrink: 1, gap: space.half }}>
              {overline ? <Text variant="overline">{overline}</Text> : null}
              <Heading level={1}>{title}</Heading>
              {subtitle ? <Text variant="muted">{subtitle}</Text> : null}
            </View>
            {actions ? <View style={{ flexDirection: 'row', flexWrap: 'wrap', gap: space.s1 }}>{actions}</View> : null}
          </View>
        ) : null}
        {children}
      </View>
    </ScrollView>
  );
}

/** A titled part of a screen. */
export function Section({ title, description, actions, children }: { title: string; description?: string; actions?: React.ReactNode; children?: React.ReactNode }) {
  return (
    <View style={{ gap: space.s2 }}>
      <View style={{ flexDirection: 'row', flexWrap: 'wrap', alignItems: 'flex-end', justifyContent: 'space-between', gap: space.s1 }}>
        <View style={{ flexShrink: 1, gap: 2 }}>
          <Heading level={2}>{title}</Heading>
          {description ? <Text variant="muted">{description}</Text> : null}
        </View>
        {actions}
      </View>
      {children}
    </View>
  );
}
