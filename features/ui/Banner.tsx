import { View } from 'react-native';
import { Icon, type IconName } from './icons';
import { Text } from './Text';
import { colors } from './theme';
import { radius, space } from './tokens';

export type BannerTone = 'info' | 'caution' | 'error' | 'success';

const tones: Record<BannerTone, { word: string; icon: IconName; fg: string; bg: string }> = {
  info: { word: 'Note', icon: 'info', fg: colors.accent, bg: colors.accentSoft },
  caution: { word: 'Caution', icon: 'caution', fg: colors.unsure, bg: colors.unsureSoft },
  error: { word: 'Error', icon: 'error', fg: colors.fail, bg: colors.failSoft },
  success: { word: 'Done', icon: 'pass', fg: colors.pass, bg: colors.passSoft },
};

export interface BannerProps {
  tone?: BannerTone;
  /** The message; the tone's word ("Error", "Caution") is always shown before it. */
  children: React.ReactNode;
  /** Overrides the tone's word. */
  word?: string;
  action?: React.ReactNode;
  testID?: string;
}

/** A message strip: icon + word + text, never colour alone. Errors are announced (role alert). */
export function Banner({ tone = 'info', children, word, action, testID }: BannerProps) {
  const t = tones[tone];
  return (
    <View
      testID={testID}
      role={tone === 'error' ? 'alert' : 'status'}
      style={{
        flexDirection: 'row',
        alignItems: 'flex-start',
        gap: space.s1,
        padding: space.s2,
        backgroundColor: t.bg,
        borderLeftWidth: 4,
        borderLeftColor: t.fg,
        borderRadius: radius.sm,
      }}
    >
      <View style={{ paddingTop: 2 }}>
        <Icon name={t.icon} size={20} color={t.fg} />
      </View>
      <View style={{ flex: 1, gap: space.s1 }}>
        <Text>
          <Text variant="bodyStrong" style={{ color: t.fg }}>
            {word ?? t.word}:{' '}
          </Text>
          {children}
        </Text>
        {action}
      </View>
    </View>
  );
}
