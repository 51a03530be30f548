import { View } from 'react-native';
import Svg, { Path, Rect } from 'react-native-svg';
import { Heading, Text } from './Text';
import { colors } from './theme';
import { radius, space } from './tokens';

/** A quiet drawing: an empty frame with one faint wave, the look of a study with no data yet. */
function EmptyFrame() {
  return (
    <Svg width={96} height={64} viewBox="0 0 96 64" aria-hidden accessibilityElementsHidden importantForAccessibility="no-hide-descendants">
      <Rect x={4} y={6} width={88} height={52} rx={6} fill={colors.surface} stroke={colors.rule} strokeWidth={1.5} />
      <Path d="M16 40c8-12 16-12 24 0s16 12 24 0 12-10 16-6" stroke={colors.envelopeWide} strokeWidth={2.5} fill="none" strokeLinecap="round" />
      <Path d="M16 22h28" stroke={colors.rule} strokeWidth={3} strokeLinecap="round" />
    </Svg>
  );
}

export function EmptyState({ title, message, action }: { title: string; message?: string; action?: React.ReactNode }) {
  return (
    <View
      style={{
        alignItems: 'center',
        gap: space.s2,
        paddingVertical: space.s6,
        paddingHorizontal: space.s3,
        borderWidth: 1,
        borderStyle: 'dashed',
        borderColor: colors.ruleStrong,
        borderRadius: radius.md,
      }}
    >
      <EmptyFrame />
      <Heading level={2} align="center">
        {title}
      </Heading>
      {message ? (
        <Text variant="muted" align="center" style={{ maxWidth: 480 }}>
          {message}
        </Text>
      ) : null}
      {action}
    </View>
  );
}
