import { View } from 'react-native';
import { Text } from '../ui/Text';
import { colors } from '../ui/theme';
import { radius, space } from '../ui/tokens';

/** A thin progress bar with its figures in words beside it (never the bar alone). */
export function ProgressBar({ done, total, caption, unit = 'chains', testID }: { done: number; total: number; caption?: string; unit?: string; testID?: string }) {
  const share = total > 0 ? Math.min(1, Math.max(0, done / total)) : 0;
  const percent = Math.round(share * 100);
  return (
    <View style={{ gap: space.half }} testID={testID}>
      <View
        role="progressbar"
        aria-valuemin={0}
        aria-valuemax={total}
        aria-valuenow={done}
        accessibilityLabel={`${done} of ${total} ${unit} done`}
        style={{ height: 8, borderRadius: radius.pill, backgroundColor: colors.surfaceSunk, borderWidth: 1, borderColor: colors.rule, overflow: 'hidden' }}
      >
        <View style={{ width: `${percent}%`, height: '100%', backgroundColor: colors.accent }} />
      </View>
      <Text variant="caption">
        <Text variant="figure" style={{ color: colors.muted }}>
          {done.toLocaleString('en-GB')} / {total.toLocaleString('en-GB')}
        </Text>{' '}
        {unit} ({percent}%){caption ? ` · ${caption}` : ''}
      </Text>
    </View>
  );
}
