/** A verdict as a word with its icon (and colour only as support): pass, fail, unsure or awaiting review. */
import { View } from 'react-native';
import { VERDICT_WORDS, type Verdict } from '../../shared/review';
import { Icon, type IconName } from '../ui/icons';
import { Text } from '../ui/Text';
import { colors } from '../ui/theme';
import { radius, space } from '../ui/tokens';

export const verdictLook: Record<Verdict | 'awaiting', { word: string; icon: IconName; fg: string; bg: string; border: string }> = {
  pass: { word: VERDICT_WORDS.pass, icon: 'pass', fg: colors.pass, bg: colors.passSoft, border: colors.passBorder },
  fail: { word: VERDICT_WORDS.fail, icon: 'fail', fg: colors.fail, bg: colors.failSoft, border: colors.failBorder },
  unsure: { word: VERDICT_WORDS.unsure, icon: 'unsure', fg: colors.unsure, bg: colors.unsureSoft, border: colors.unsureBorder },
  awaiting: { word: 'Awaiting review', icon: 'info', fg: colors.muted, bg: colors.surfaceSunk, border: colors.rule },
};

export function VerdictBadge({ verdict, size = 'small', testID }: { verdict: Verdict | null; size?: 'small' | 'large'; testID?: string }) {
  const look = verdictLook[verdict ?? 'awaiting'];
  return (
    <View
      testID={testID}
      accessibilityLabel={`Verdict: ${look.word}`}
      style={{
        flexDirection: 'row',
        alignItems: 'center',
        alignSelf: 'flex-start',
        gap: space.half,
        paddingHorizontal: space.s1,
        paddingVertical: size === 'large' ? space.half : 2,
        borderRadius: radius.pill,
        borderWidth: 1,
        borderColor: look.border,
        backgroundColor: look.bg,
        borderStyle: verdict ? 'solid' : 'dashed',
      }}
    >
      <Icon name={look.icon} size={size === 'large' ? 18 : 14} color={look.fg} />
      <Text variant="label" style={{ color: look.fg }}>
        {look.word}
      </Text>
    </View>
  );
}
