import { ActivityIndicator, View } from 'react-native';
import { Banner } from './Banner';
import { Button } from './Button';
import { Text } from './Text';
import { colors } from './theme';
import { space } from './tokens';

/** A spinner with words, for a part of a screen that is still loading. */
export function Loading({ label = 'Loading…', fill = false }: { label?: string; fill?: boolean }) {
  return (
    <View
      role="progressbar"
      accessibilityLabel={label}
      style={[
        { flexDirection: 'row', alignItems: 'center', gap: space.s1, paddingVertical: space.s3 },
        fill ? { flex: 1, justifyContent: 'center', backgroundColor: colors.paper } : null,
      ]}
    >
      <ActivityIndicator color={colors.accent} />
      <Text variant="muted">{label}</Text>
    </View>
  );
}

/** An error banner with a retry button, for a failed load. */
export function LoadError({ message, onRetry }: { message: string; onRetry?: () => void }) {
  return (
    <Banner tone="error" action={onRetry ? <Button label="Try again" variant="secondary" onPress={onRetry} /> : undefined}>
      {message}
    </Banner>
  );
}
