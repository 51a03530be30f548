import { View } from 'react-native';
import { Icon, type IconName } from './icons';
import { Text } from './Text';
import { colors } from './theme';
import { radius, space } from './tokens';

export type BadgeTone = 'neutral' | 'accent' | 'pass' | 'fail' | 'unsure';

const tones: Record<BadgeTone, { fg: string; bg: string; border: string }> = {
  neutral: { fg: colors.muted, bg: colors.surfaceSunk, border: colors.rule },
  accent: { fg: colors.accent, bg: colors.accentSoft, border: colors.accentBorder },
  pass: { fg: colors.pass, bg: colors.passSoft, border: colors.passBorder },
  fail: { fg: colors.fail, bg: colors.failSoft, border: colors.failBorder },
  unsure: { fg: colors.unsure, bg: colors.unsureSoft, border: colors.unsureBorder },
};

/** A small label; the word carries the meaning, the tone and optional icon only support it. */
export function Badge({ label, tone = 'neutral', icon }: { label: string; tone?: BadgeTone; icon?: IconName }) {
  const t = tones[tone];
  return (
    <View
      style={{
        flexDirection: 'row',
        alignItems: 'center',
        alignSelf: 'flex-start',
        gap: space.half,
        paddingHorizontal: space.s1,
        paddingVertical: 2,
        borderRadius: radius.pill,
        borderWidth: 1,
        borderColor: t.border,
        backgroundColor: t.bg,
      }}
    >
      {icon ? <Icon name={icon} size={14} color={t.fg} /> : null}
      <Text variant="label" style={{ color: t.fg, fontSize: 13, lineHeight: 18 }}>
        {label}
      </Text>
    </View>
  );
}
