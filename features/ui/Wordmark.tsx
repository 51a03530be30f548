/**
 * The Wavefit wordmark: three stacked wave lines (three panel waves, the observed one in teal
 * between two simulated ones in slate) beside the name.
 */
import { View } from 'react-native';
import Svg, { Path } from 'react-native-svg';
import { Text } from './Text';
import { colors } from './theme';
import { space } from './tokens';

export function WaveMark({ size = 28 }: { size?: number }) {
  const line = { strokeWidth: 2.4, strokeLinecap: 'round' as const, fill: 'none' };
  return (
    <Svg width={size} height={size} viewBox="0 0 28 28" aria-hidden accessibilityElementsHidden importantForAccessibility="no-hide-descendants">
      <Path d="M3 8c2.6-3.2 5.2-3.2 7.8 0s5.2 3.2 7.8 0 4.6-3 6.4-1" stroke={colors.envelopeWide} {...line} />
      <Path d="M3 14c2.6-3.2 5.2-3.2 7.8 0s5.2 3.2 7.8 0 4.6-3 6.4-1" stroke={colors.accent} {...line} />
      <Path d="M3 20c2.6-3.2 5.2-3.2 7.8 0s5.2 3.2 7.8 0 4.6-3 6.4-1" stroke={colors.envelopeNarrow} {...line} />
    </Svg>
  );
}

export function Wordmark({ size = 'regular' }: { size?: 'regular' | 'large' }) {
  const large = size === 'large';
  return (
    <View
      style={{ flexDirection: 'row', alignItems: 'center', gap: space.s1 }}
      accessible
      accessibilityRole="image"
      accessibilityLabel="Wavefit"
    >
      <WaveMark size={large ? 40 : 28} />
      <Text variant={large ? 'title' : 'heading'} style={{ letterSpacing: 0.2 }}>
        Wavefit
      </Text>
    </View>
  );
}
