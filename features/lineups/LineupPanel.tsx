/**
 * One panel of a lineup: the statistic's values as points joined by a line, on the axes every panel of
 * the lineup shares, in one ink colour. Nothing marks the observed wave; a picked panel gets a thick
 * frame. Pressable, with its number for screen readers and the keyboard.
 */
import { Pressable, View } from 'react-native';
import Svg, { Circle, Line, Polyline } from 'react-native-svg';
import { Text } from '../ui/Text';
import { colors } from '../ui/theme';
import { radius, space } from '../ui/tokens';

export function LineupPanel({
  number,
  values,
  yMin,
  yMax,
  width,
  selected,
  disabled,
  mark,
  onPress,
}: {
  number: number;
  values: number[];
  yMin: number;
  yMax: number;
  width: number;
  selected: boolean;
  disabled?: boolean;
  /** After the pick: 'observed' on the observed panel, 'mine' on a wrong pick. */
  mark?: 'observed' | 'mine' | null;
  onPress?: () => void;
}) {
  const height = Math.round(width * 0.7);
  const pad = 6;
  const n = values.length;
  const x = (k: number) => pad + (n > 1 ? (k / (n - 1)) * (width - 2 * pad) : (width - 2 * pad) / 2);
  const y = (v: number) => pad + (1 - (v - yMin) / (yMax - yMin)) * (height - 2 * pad);
  const points = values.map((v, k) => `${x(k).toFixed(1)},${y(v).toFixed(1)}`).join(' ');
  const zero = yMin < 0 && yMax > 0 ? y(0) : null;
  const frame = mark === 'observed' ? colors.pass : mark === 'mine' ? colors.fail : selected ? colors.accent : colors.rule;
  return (
    <Pressable
      role="radio"
      aria-checked={selected}
      accessibilityLabel={`Panel ${number}${mark === 'observed' ? ', the observed wave' : mark === 'mine' ? ', your pick' : ''}`}
      disabled={disabled}
      onPress={onPress}
      testID={`lineup-panel-${number}`}
      style={{
        width,
        borderWidth: selected || mark ? 3 : 1,
        borderColor: frame,
        borderRadius: radius.sm,
        backgroundColor: colors.surface,
        padding: selected || mark ? 0 : 2,
      }}
    >
      <Svg width={width - 6} height={height} aria-hidden>
        {zero !== null ? <Line x1={pad} x2={width - pad} y1={zero} y2={zero} stroke={colors.rule} strokeWidth={1} /> : null}
        <Line x1={pad} x2={width - pad} y1={height - pad} y2={height - pad} stroke={colors.rule} strokeWidth={1} />
        <Polyline points={points} fill="none" stroke={colors.ink} strokeWidth={1.5} />
        {width >= 120 ? values.map((v, k) => <Circle key={k} cx={x(k)} cy={y(v)} r={2} fill={colors.ink} />) : null}
      </Svg>
      <View style={{ paddingHorizontal: space.half, paddingBottom: 2 }}>
        <Text variant="caption">{String(number)}</Text>
      </View>
    </Pressable>
  );
}
