/**
 * Choosing the tie-frequency threshold: a stepper of our own (no slider package in the project).
 * A minus and a plus button (each a 44 px keyboard-reachable button), a track that is a slider in
 * its own right (click or drag it with a pointer; arrow keys, Page Up/Down, Home and End when it has
 * focus), the value in words announced politely, and quick picks. The value is a share of chains from
 * `min` to 1 in steps of `step`; anything that is not a finite number (a pointer event without
 * coordinates, say) is ignored, so no NaN ever reaches the screen or the server.
 */
import { useRef } from 'react';
import { Platform, View, type GestureResponderEvent } from 'react-native';
import { Button } from '../ui/Button';
import { Text } from '../ui/Text';
import { colors } from '../ui/theme';
import { fonts, radius, space, touchTarget } from '../ui/tokens';
import { clampThreshold, thresholdAt, thresholdForKey } from './threshold';

export { clampThreshold, thresholdAt, thresholdForKey } from './threshold';

export function ThresholdStepper({ value, onChange, min = 0.05, step = 0.05 }: { value: number; onChange: (v: number) => void; min?: number; step?: number }) {
  const track = useRef<View>(null);
  // Where the track sits on the page, measured when a press starts (the page may have scrolled since layout).
  const frameRef = useRef({ left: 0, width: 0 });
  const pct = (v: number) => `${Math.round(v * 100)}%`;
  const set = (v: number) => {
    if (!Number.isFinite(v)) return;
    const next = Number(clampThreshold(v, min, step).toFixed(2));
    if (Number.isFinite(next) && Math.abs(next - value) > 1e-9) onChange(next);
  };
  const measure = () => {
    const node = track.current as unknown as { getBoundingClientRect?: () => { left: number; width: number } } | null;
    if (Platform.OS === 'web' && node?.getBoundingClientRect) {
      const r = node.getBoundingClientRect();
      frameRef.current = { left: r.left, width: r.width };
      return;
    }
    track.current?.measureInWindow((x, _y, width) => {
      frameRef.current = { left: x, width };
    });
  };
  const pointerX = (e: GestureResponderEvent) => {
    const n = e.nativeEvent;
    // On the web the track is measured in viewport coordinates; pageX includes the scroll.
    if (Platform.OS === 'web' && typeof window !== 'undefined') return (n.pageX ?? NaN) - window.scrollX;
    return n.pageX;
  };
  const follow = (e: GestureResponderEvent) => {
    const v = thresholdAt(pointerX(e), frameRef.current.left, frameRef.current.width, min, step);
    if (v !== null) set(v);
  };
  const share = (value - min) / (1 - min);
  return (
    <View role="group" accessibilityLabel="Tie frequency threshold" style={{ gap: space.s1 }}>
      <Text variant="label">Show ties that appear in at least this share of simulated networks</Text>
      <View style={{ flexDirection: 'row', alignItems: 'center', gap: space.s1 }}>
        <Button label="−" accessibilityLabel={`Lower the threshold to ${pct(Math.max(min, value - step))}`} variant="secondary" onPress={() => set(value - step)} disabled={value <= min + 1e-9} />
        <View style={{ flex: 1, gap: 2 }}>
          <View
            ref={track}
            role="slider"
            aria-label="Threshold"
            aria-valuemin={Math.round(min * 100)}
            aria-valuemax={100}
            aria-valuenow={Math.round(value * 100)}
            aria-valuetext={`${pct(value)} of chains`}
            focusable
            testID="threshold-track"
            onKeyDown={(e: { nativeEvent: { key: string }; preventDefault?: () => void }) => {
              const next = thresholdForKey(e.nativeEvent.key, value, min, step);
              if (next === null) return;
              e.preventDefault?.();
              set(next);
            }}
            onStartShouldSetResponder={() => true}
            onMoveShouldSetResponder={() => true}
            onResponderTerminationRequest={() => false}
            onResponderGrant={(e) => {
              measure();
              follow(e);
            }}
            onResponderMove={follow}
            onResponderRelease={follow}
            onLayout={() => measure()}
            style={{ height: touchTarget, justifyContent: 'center', cursor: 'pointer', borderRadius: radius.sm }}
          >
            <View pointerEvents="none" style={{ height: 6, borderRadius: radius.pill, backgroundColor: colors.surfaceSunk, borderWidth: 1, borderColor: colors.rule }}>
              <View style={{ width: `${Math.round(share * 100)}%`, height: 4, borderRadius: radius.pill, backgroundColor: colors.accent }} />
            </View>
            <View
              pointerEvents="none"
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
          </View>
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
