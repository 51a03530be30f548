import { Platform, Pressable } from 'react-native';
import { Icon, type IconName } from './icons';
import { Text } from './Text';
import { colors } from './theme';
import { fonts, radius, space, touchTarget } from './tokens';
import { useInteraction } from './useInteraction';

/** A download link drawn as a button (an <a download> on the web, so the browser saves the file). */
export function DownloadLink({ href, label, accessibilityLabel, icon = 'outbox' }: { href: string; label: string; accessibilityLabel: string; icon?: IconName }) {
  const { hovered, focused, handlers } = useInteraction();
  const webProps = Platform.OS === 'web' ? ({ href, hrefAttrs: { download: '' } } as object) : {};
  return (
    <Pressable
      {...handlers}
      {...webProps}
      accessibilityRole="link"
      accessibilityLabel={accessibilityLabel}
      onPress={Platform.OS === 'web' ? undefined : () => undefined}
      style={{
        minHeight: touchTarget,
        paddingHorizontal: space.s2,
        flexDirection: 'row',
        alignItems: 'center',
        gap: space.s1,
        borderRadius: radius.sm,
        borderWidth: 1,
        borderColor: colors.ruleStrong,
        backgroundColor: hovered ? colors.surfaceSunk : colors.surface,
        ...(focused ? { outlineColor: colors.focus, outlineWidth: 2, outlineStyle: 'solid' as const, outlineOffset: 2 } : null),
      }}
    >
      <Icon name={icon} size={18} color={colors.accent} />
      <Text style={{ color: colors.accent, fontFamily: fonts.textBold }}>{label}</Text>
    </Pressable>
  );
}
