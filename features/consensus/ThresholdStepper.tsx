/**
 * Choosing the tie-frequency threshold: a stepper of our own (no slider package in the project).
 * A minus and a plus button (each a 44 px keyboard-reachable button), the value in words announced
 * politely, a track that shows where the value sits and, with a pointer, sets it where pressed, and
 * quick picks. The value is a share of chains from `min` to 1 in steps of `step`.
 */
import { useState } from 'react';
import { Pressable, View } from 'react-native';
import { Button } from '../ui/Button';
import { Text } from '../ui/Text';
import { colors } from '../ui/theme';
import { fonts, radius, space, touchTarget } from '../ui/tokens';

export const clampThreshold = (v: number, min: number, step: number) => Math.min(1, Math.max(min, Math.round(v / step) * step));

export function ThresholdStepper({ value, onChange, min = 0.05, step = 0.05 }: { value: number; onChange: (v: number) => void; min?: number; step?: number }) {
  const [trackWidth, setTrackWidth] = useState(0);
  const pct = (v: number) => `${Math.round(v * 100)}%`;
  const set = (v: number) => onChange(Number(clampThreshold(v, min, step).toFixed(2)));
  const share = (value - min) / (1 - min);
  return (
    <View role="group" accessibilityLabel="Tie frequency threshold" style={{ gap: space.s1 }}>
      <Text variant="label">Show ties that appear in at least this share of simulated networks</Text>
      <View style={{ flexDirection: 'row', alignItems: 'center', gap: space.s1 }}>
        <Button label="−" accessibilityLabel={`Lower the threshold to ${pct(Math.max(min, value - step))}`} variant="secondary" onPress={() => set(value - step)} disabled={value <= min + 1e-9} />
        <View style={{ flex: 1, gap: 2 }}>
          <Pressable
            accessibilityElementsHidden
            importantForAccessibility="no-hide-descendants"
            aria-hidden
            focusable={false}
            onLayout={(e) => setTrackWidth(e.nativeEvent.layout.width)}
            onPress={(e) => {
              if (trackWidth > 0) set(min + (e.nativeEvent.locationX / trackWidth) * (1 - min));
            }}
            style={{ height: touchTarget, justifyContent: 'center', cursor: 'pointer' }}
          >
            <View style={{ height: 6, borderRadius: radius.pill, backgroundColor: colors.surfaceSunk, borderWidth: 1, borderColor: colors.rule }}>
              <View style={{ width: `${Math.round(share * 100)}%`, height: 4, borderRadius: radius.pill, backgroundColor: colors.accent }} />
            </View>
            <View
              style={{
                position: 'absolute',
                left: `${Math.round(share * 100)}%`,
                marginLeft: -10,
                width: 20,
                height: 20,
                borderRadius: 10,
                backgroundColor: colors.surface,
                borderWidth: 3,
                borderColor: colors.accent,
              }}
            />
          </Pressable>
        </View>
        <Button label="+" accessibilityLabel={`Raise the threshold to ${pct(Math.min(1, value + step))}`} variant="secondary" onPress={() => set(value + step)} disabled={value >= 1 - 1e-9} />
      </View>
      <Text role="status" aria-live="polite" style={{ fontFamily: fonts.monoMedium }} testID="threshold-value">
        {`Threshold ${pct(value)} of chains`}
      </Text>
      <View style={{ flexDirection: 'row', flexWrap: 'wrap', gap: space.half }}>
        {[0.25, 0.5, 0.75, 0.9].map((v) => (
          <Button key={v} label={pct(v)} accessibilityLabel={`Set the threshold to ${pct(v)}`} variant={Math.abs(v - value) < 1e-9 ? 'primary' : 'quiet'} onPress={() => set(v)} />
        ))}
      </View>
    </View>
  );
}
