/** How many cards pass, fail, are unsure or await review: four figures, each with its word and icon. */
import { View } from 'react-native';
import type { VerdictCounts } from '../../shared/review';
import { Icon } from '../ui/icons';
import { Text } from '../ui/Text';
import { colors } from '../ui/theme';
import { radius, space } from '../ui/tokens';
import { verdictLook } from './verdictWords';

export function SummaryStrip({ counts }: { counts: VerdictCounts }) {
  const items = [
    { key: 'pass', n: counts.pass },
    { key: 'fail', n: counts.fail },
    { key: 'unsure', n: counts.unsure },
    { key: 'awaiting', n: counts.awaiting },
  ] as const;
  const sentence = `${counts.pass} pass, ${counts.fail} fail, ${counts.unsure} unsure, ${counts.awaiting} awaiting review, of ${counts.total} statistics`;
  return (
    <View
      role="status"
      accessibilityLabel={`Summary: ${sentence}`}
      testID="summary-strip"
      style={{ flexDirection: 'row', flexWrap: 'wrap', gap: space.s1 }}
    >
      {items.map(({ key, n }) => {
        const look = verdictLook[key];
        return (
          <View
            key={key}
            testID={`summary-${key}`}
            style={{
              flexGrow: 1,
              flexBasis: 140,
              flexDirection: 'row',
              alignItems: 'center',
              gap: space.s1,
              padding: space.s1 + 4,
              borderRadius: radius.md,
              borderWidth: 1,
              borderColor: colors.rule,
              borderLeftWidth: 4,
              borderLeftColor: look.fg,
              backgroundColor: colors.surface,
            }}
          >
            <Icon name={look.icon} size={22} color={look.fg} />
            <View>
              <Text variant="figureLarge">{n}</Text>
              <Text variant="caption" style={{ color: colors.ink }}>
                {look.word}
              </Text>
            </View>
          </View>
        );
      })}
    </View>
  );
}
