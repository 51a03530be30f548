import { Pressable, View } from 'react-native';
import { Text } from './Text';
import { colors } from './theme';
import { fonts, radius, space, touchTarget } from './tokens';

export interface SegmentOption<V extends string> {
  value: V;
  label: string;
  /** Read by screen readers after the label. */
  description?: string;
}

export interface SegmentedControlProps<V extends string> {
  /** Names the group for screen readers (and is shown above it unless hideLabel). */
  label: string;
  hideLabel?: boolean;
  options: readonly SegmentOption<V>[];
  value: V | null;
  onChange: (value: V) => void;
  disabled?: boolean;
  error?: string;
}

interface PressState {
  pressed: boolean;
  hovered?: boolean;
  focused?: boolean;
}

/** A single choice among a few options (a radio group drawn as joined segments). */
export function SegmentedControl<V extends string>({
  label,
  hideLabel,
  options,
  value,
  onChange,
  disabled,
  error,
}: SegmentedControlProps<V>) {
  return (
    <View style={{ gap: space.half }}>
      {hideLabel ? null : <Text variant="label">{label}</Text>}
      <View
        accessibilityRole="radiogroup"
        accessibilityLabel={label}
        style={{
          flexDirection: 'row',
          alignSelf: 'flex-start',
          maxWidth: '100%',
          borderWidth: 1,
          borderColor: error ? colors.fail : colors.ruleStrong,
          borderRadius: radius.sm,
          backgroundColor: colors.surface,
          overflow: 'hidden',
        }}
      >
        {options.map((o, i) => {
          const selected = o.value === value;
          return (
            <Pressable
              key={o.value}
              accessibilityRole="radio"
              accessibilityLabel={o.description ? `${o.label}: ${o.description}` : o.label}
              accessibilityState={{ checked: selected, disabled: !!disabled }}
              aria-checked={selected}
              disabled={disabled}
              onPress={() => onChange(o.value)}
              style={(state) => {
                const { hovered, focused } = state as PressState;
                return [
                  {
                    minHeight: touchTarget,
                    paddingHorizontal: space.s2,
                    justifyContent: 'center',
                    alignItems: 'center',
                    flexShrink: 1,
                    borderLeftWidth: i === 0 ? 0 : 1,
                    borderLeftColor: colors.ruleStrong,
                    backgroundColor: selected ? colors.accent : hovered ? colors.surfaceSunk : 'transparent',
                    opacity: disabled ? 0.5 : 1,
                    cursor: disabled ? 'auto' : 'pointer',
                  } as const,
                  focused ? ({ outlineColor: colors.focus, outlineWidth: 2, outlineStyle: 'solid', outlineOffset: -3 } as const) : null,
                ];
              }}
            >
              <Text
                numberOfLines={1}
                style={{ color: selected ? colors.onAccent : colors.ink, fontFamily: selected ? fonts.textBold : fonts.text }}
              >
                {o.label}
              </Text>
            </Pressable>
          );
        })}
      </View>
      {error ? (
        <Text variant="small" style={{ color: colors.fail }}>
          {error}
        </Text>
      ) : null}
    </View>
  );
}
