/** A single choice among a few options drawn as wrapping chips (a radio group), for labels too long for joined segments. */
import { Pressable, View } from 'react-native';
import { Text } from '../ui/Text';
import { colors } from '../ui/theme';
import { fonts, radius, space, touchTarget } from '../ui/tokens';

interface PressState {
  pressed: boolean;
  hovered?: boolean;
  focused?: boolean;
}

export function ChoiceChips<V extends string>({ label, options, value, onChange }: { label: string; options: { value: V; label: string; description?: string }[]; value: V; onChange: (v: V) => void }) {
  return (
    <View style={{ gap: space.half }}>
      <Text variant="label">{label}</Text>
      <View accessibilityRole="radiogroup" accessibilityLabel={label} style={{ flexDirection: 'row', flexWrap: 'wrap', gap: space.half }}>
        {options.map((o) => {
          const selected = o.value === value;
          return (
            <Pressable
              key={o.value}
              accessibilityRole="radio"
              accessibilityLabel={o.description ? `${o.label}: ${o.description}` : o.label}
              accessibilityState={{ checked: selected }}
              aria-checked={selected}
              onPress={() => onChange(o.value)}
              style={(s) => {
                const { hovered, focused } = s as PressState;
                return [
                  {
                    minHeight: touchTarget,
                    paddingHorizontal: space.s2 - 4,
                    justifyContent: 'center',
                    borderRadius: radius.pill,
                    borderWidth: 1,
                    borderColor: selected ? colors.accent : colors.ruleStrong,
                    backgroundColor: selected ? colors.accent : hovered ? colors.surfaceSunk : colors.surface,
                  },
                  focused ? { outlineColor: colors.focus, outlineWidth: 2, outlineStyle: 'solid' as const, outlineOffset: 2 } : null,
                ];
              }}
            >
              <Text style={{ color: selected ? colors.onAccent : colors.ink, fontFamily: selected ? fonts.textBold : fonts.text }}>
                {o.label}
                {o.description ? <Text style={{ color: selected ? colors.onAccent : colors.muted }}>{` (${o.description})`}</Text> : null}
              </Text>
            </Pressable>
          );
        })}
      </View>
    </View>
  );
}
