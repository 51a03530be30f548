/**
 * One wave as a small node-link drawing (react-native-svg). Every wave uses the same node positions
 * (the study's seeded layout), so an actor stays in one place from wave to wave. Ties new since the
 * wave before are drawn thicker in the accent colour, ties kept from it thin and grey: told apart by
 * width as well as colour, and named in the legend. Actors absent at this wave are hollow.
 */
import Svg, { Circle, G, Line, Polygon, Rect, Text as SvgText } from 'react-native-svg';
import { View } from 'react-native';
import { Text } from '../ui/Text';
import { colors } from '../ui/theme';
import { space } from '../ui/tokens';

const SIZE = 1000;
const PAD = 80;

export interface DrawnTie {
  from: number;
  to: number;
  /** New since the wave before (false for the first wave). */
  created: boolean;
}

export function WaveDrawing({
  actors,
  positions,
  ties,
  absent,
  width,
  label,
  testID,
}: {
  actors: string[];
  positions: Array<[number, number]>;
  ties: DrawnTie[];
  absent: boolean[];
  width: number;
  label: string;
  testID?: string;
}) {
  const P = positions.map(([x, y]) => [PAD + x * (SIZE - 2 * PAD), PAD + y * (SIZE - 2 * PAD)] as const);
  const pairs = new Set(ties.map((t) => `${t.from}-${t.to}`));
  // Sizes in viewBox units, kept legible however small the drawing is (px * SIZE / width).
  const px = SIZE / Math.max(width, 1);
  const r = Math.max(actors.length > 40 ? 9 : actors.length > 20 ? 13 : 17, 4 * px);
  const showLabels = actors.length <= 30;
  const fontSize = Math.max(30, 12 * px);
  const keptWidth = Math.max(3, 1.5 * px);
  const newWidth = Math.max(6, 3 * px);
  const sorted = [...ties].sort((a, b) => Number(a.created) - Number(b.created));
  return (
    <View accessibilityRole="image" accessibilityLabel={label} style={{ width, height: width }} testID={testID}>
      <Svg width={width} height={width} viewBox={`0 0 ${SIZE} ${SIZE}`}>
        <Rect x={0} y={0} width={SIZE} height={SIZE} fill={colors.surface} />
        <G>
          {sorted.map((t) => {
            const [x1, y1] = P[t.from];
            const [x2, y2] = P[t.to];
            const dx = x2 - x1;
            const dy = y2 - y1;
            const len = Math.hypot(dx, dy) || 1;
            const ux = dx / len;
            const uy = dy / len;
            const off = pairs.has(`${t.to}-${t.from}`) ? 8 : 0;
            const ox = -uy * off;
            const oy = ux * off;
            const sx = x1 + ux * (r + 4) + ox;
            const sy = y1 + uy * (r + 4) + oy;
            const ex = x2 - ux * (r + 6) + ox;
            const ey = y2 - uy * (r + 6) + oy;
            const head = (t.created ? 4.5 : 3.5) * Math.max(px, 5);
            const hx = ex - ux * head;
            const hy = ey - uy * head;
            const colour = t.created ? colors.accent : colors.ruleStrong;
            const w = t.created ? newWidth : keptWidth;
            const hw = head * 0.45;
            return (
              <G key={`${t.from}-${t.to}`}>
                <Line x1={sx} y1={sy} x2={hx} y2={hy} stroke={colour} strokeWidth={w} strokeLinecap="round" />
                <Polygon points={`${ex},${ey} ${hx - uy * hw},${hy + ux * hw} ${hx + uy * hw},${hy - ux * hw}`} fill={colour} />
              </G>
            );
          })}
        </G>
        <G>
          {P.map(([x, y], i) => (
            <G key={i}>
              <Circle cx={x} cy={y} r={r} fill={absent[i] ? colors.surface : colors.ink} stroke={colors.ink} strokeWidth={Math.max(3, px)} strokeDasharray={absent[i] ? `${3 * px},${2.5 * px}` : undefined} />
              {showLabels ? (
                <SvgText
                  x={positions[i][0] > 0.7 ? x - r - 6 : x + r + 6}
                  y={y - r - 2}
                  textAnchor={positions[i][0] > 0.7 ? 'end' : 'start'}
                  fontSize={fontSize} fill={absent[i] ? colors.muted : colors.ink} fontFamily="Atkinson-Regular, sans-serif">
                  {actors[i]}
                </SvgText>
              ) : null}
            </G>
          ))}
        </G>
      </Svg>
    </View>
  );
}

export function WaveLegend({ withAbsent }: { withAbsent: boolean }) {
  const item = (colour: string, height: number, word: string) => (
    <View style={{ flexDirection: 'row', alignItems: 'center', gap: space.half }}>
      <View style={{ width: 28, height, backgroundColor: colour, borderRadius: height }} />
      <Text variant="caption">{word}</Text>
    </View>
  );
  return (
    <View style={{ flexDirection: 'row', flexWrap: 'wrap', gap: space.s2 }} accessibilityLabel="Legend of the drawings">
      {item(colors.accent, 5, 'thick teal: tie new since the wave before')}
      {item(colors.ruleStrong, 2, 'thin grey: tie kept from the wave before')}
      {withAbsent ? (
        <View style={{ flexDirection: 'row', alignItems: 'center', gap: space.half }}>
          <View style={{ width: 14, height: 14, borderRadius: 7, borderWidth: 2, borderStyle: 'dashed', borderColor: colors.ink }} />
          <Text variant="caption">hollow: actor not present at that wave</Text>
        </View>
      ) : null}
    </View>
  );
}
