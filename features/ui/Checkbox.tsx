import { Pressable, View } from 'react-native';
import { Icon } from './icons';
import { Text } from './Text';
import { colors } from './theme';
import { radius, space, touchTarget } from './tokens';

interface PressState {
  pressed: boolean;
  hovered?: boolean;
  focused?: boolean;
}

/** A labelled checkbox with an optional hint underneath (role checkbox, aria-checked, 44 px target). */
export function Checkbox({
  label,
  hint,
  checked,
  onChange,
  disabled,
  testID,
}: {
  label: string;
  hint?: string;
  checked: boolean;
  onChange: (checked: boolean) => void;
  disabled?: boolean;
  testID?: string;
}) {
  return (
    <Pressable
      testID={testID}
      role="checkbox"
      aria-checked={checked}
      aria-disabled={disabled}
      accessibilityLabel={hint ? `${label}. ${hint}` : label}
      disabled={disabled}
      onPress={() => onChange(!checked)}
      style={(s) => [
        {
          flexDirection: 'row',
          alignItems: 'flex-start',
          gap: space.s1,
          minHeight: touchTarget,
          paddingVertical: 10,
          paddingHorizontal: space.half,
          borderRadius: radius.sm,
          backgroundColor: (s as PressState).hovered && !disabled ? colors.surfaceSunk : 'transparent',
          opacity: disabled ? 0.55 : 1,
        },
        (s as PressState).focused ? { outlineColor: colors.focus, outlineWidth: 2, outlineStyle: 'solid' as const, outlineOffset: 1 } : null,
      ]}
    >
      <View
        style={{
          width: 22,
          height: 22,
          marginTop: 1,
          borderRadius: radius.sm,
          borderWidth: 2,
          borderColor: checked ? colors.accent : colors.ruleStrong,
          backgroundColor: checked ? colors.accent : colors.surface,
          alignItems: 'center',
          justifyContent: 'center',
        }}
      >
        {checked ? <Icon name="pass" size={14} color={colors.onAccent} /> : null}
      </View>
      <View style={{ flexShrink: 1, gap: 2 }}>
        <Text variant="bodyStrong">{label}</Text>
        {hint ? <Text variant="caption">{hint}</Text> : null}
      </View>
    </Pressable>
  );
}
