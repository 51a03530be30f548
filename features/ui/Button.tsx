import { ActivityIndicator, Pressable, View, type StyleProp, type ViewStyle } from 'react-native';
import { useRouter } from 'expo-router';
import { Icon, type IconName } from './icons';
import { Text } from './Text';
import { colors } from './theme';
import { fonts, radius, space, touchTarget } from './tokens';

export type ButtonVariant = 'primary' | 'secondary' | 'danger' | 'quiet';

export interface ButtonProps {
  label: string;
  onPress?: () => void;
  /** Navigate to this in-app path instead of (or after) onPress. */
  href?: string;
  variant?: ButtonVariant;
  icon?: IconName;
  loading?: boolean;
  disabled?: boolean;
  /** Defaults to the label; give more context when the label alone is ambiguous ("Remove Kai Moreno"). */
  accessibilityLabel?: string;
  accessibilityHint?: string;
  /** Stretch to the container width (forms on a phone). */
  block?: boolean;
  style?: StyleProp<ViewStyle>;
  testID?: string;
}

/** react-native-web adds hovered and focused to the pressable state. */
interface PressState {
  pressed: boolean;
  hovered?: boolean;
  focused?: boolean;
}

const palette: Record<ButtonVariant, { bg: string; bgActive: string; fg: string; border: string }> = {
  primary: { bg: colors.accent, bgActive: colors.accentPressed, fg: colors.onAccent, border: colors.accent },
  secondary: { bg: colors.surface, bgActive: colors.surfaceSunk, fg: colors.accent, border: colors.ruleStrong },
  danger: { bg: colors.fail, bgActive: colors.failPressed, fg: colors.onAccent, border: colors.fail },
  quiet: { bg: 'transparent', bgActive: colors.surfaceSunk, fg: colors.accent, border: 'transparent' },
};

export function Button({
  label,
  onPress,
  href,
  variant = 'primary',
  icon,
  loading = false,
  disabled = false,
  accessibilityLabel,
  accessibilityHint,
  block = false,
  style,
  testID,
}: ButtonProps) {
  const router = useRouter();
  const p = palette[variant];
  const inactive = disabled || loading;
  return (
    <Pressable
      testID={testID}
      accessibilityRole="button"
      accessibilityLabel={accessibilityLabel ?? label}
      accessibilityHint={accessibilityHint}
      accessibilityState={{ disabled: inactive, busy: loading }}
      aria-disabled={inactive}
      aria-busy={loading}
      disabled={inactive}
      onPress={() => {
        onPress?.();
        if (href) router.push(href);
      }}
      style={(state) => {
        const { pressed, hovered, focused } = state as PressState;
        return [
          {
            minHeight: touchTarget,
            paddingHorizontal: variant === 'quiet' ? space.s1 : space.s2,
            borderRadius: radius.sm,
            borderWidth: 1,
            borderColor: p.border,
            backgroundColor: pressed || hovered ? p.bgActive : p.bg,
            flexDirection: 'row',
            alignItems: 'center',
            justifyContent: 'center',
            gap: space.s1,
            alignSelf: block ? 'stretch' : 'flex-start',
            opacity: disabled && !loading ? 0.5 : 1,
            cursor: inactive ? 'auto' : 'pointer',
          } satisfies ViewStyle,
          focused ? { outlineColor: colors.focus, outlineWidth: 2, outlineStyle: 'solid', outlineOffset: 2 } : null,
          style,
        ];
      }}
    >
      {loading ? (
        <ActivityIndicator size="small" color={p.fg} />
      ) : icon ? (
        <Icon name={icon} size={18} color={p.fg} />
      ) : null}
      <Text style={{ color: p.fg, fontFamily: fonts.textBold }} numberOfLines={1}>
        {label}
      </Text>
    </Pressable>
  );
}

/** A row of buttons that wraps on a narrow screen. */
export function ButtonRow({ children, align = 'start' }: { children: React.ReactNode; align?: 'start' | 'end' }) {
  return (
    <View
      style={{
        flexDirection: 'row',
        flexWrap: 'wrap',
        gap: space.s1,
        justifyContent: align === 'end' ? 'flex-end' : 'flex-start',
        alignItems: 'center',
      }}
    >
      {children}
    </View>
  );
}
