import { Pressable, View } from 'react-native';
import { Icon } from '../ui/icons';
import { Text } from '../ui/Text';
import { colors } from '../ui/theme';
import { radius, space, touchTarget } from '../ui/tokens';

/** A labelled checkbox with a 44 px touch target (role checkbox, aria-checked). */
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
      style={{ flexDirection: 'row', alignItems: 'flex-start', gap: space.s1, minHeight: touchTarget, paddingVertical: 10, opacity: disabled ? 0.5 : 1 }}
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
