/**
 * One chain's network at a moment of the period (react-native-svg): current ties as thin ink arrows,
 * the latest changes marked (a created tie as a thick teal line with a "+" disc, a dissolved one as a
 * dashed red line with a "−" disc, so shape and word carry it, not colour alone), and the actor of the
 * latest ministep ringed.
 */
import Svg, { Circle, G, Line, Polygon, Text as SvgText } from 'react-native-svg';
import { View } from 'react-native';
import { colors } from '../ui/theme';
import { fonts } from '../ui/tokens';
import type { Frame } from './playback';

const SIZE = 1000;
const PAD = 60;

function arrowHead(x1: number, y1: number, x2: number, y2: number, r: number, size: number): { points: string; x: number; y: number } {
  const dx = x2 - x1;
  const dy = y2 - y1;
  const len = Math.hypot(dx, dy) || 1;
  const ux = dx / len;
  const uy = dy / len;
  const tx = x2 - ux * r;
  const ty = y2 - uy * r;
  const bx = tx - ux * size;
  const by = ty - uy * size;
  const px = -uy * size * 0.5;
  const py = ux * size * 0.5;
  return { points: `${tx},${ty} ${bx + px},${by + py} ${bx - px},${by - py}`, x: tx - ux * size, y: ty - uy * size };
}

export function ChainDrawing({ actors, positions, frame, width, label, showNames }: { actors: string[]; positions: Array<[number, number]>; frame: Frame; width: number; label: string; showNames: boolean }) {
  const n = actors.length;
  const pt = (i: number) => [PAD + positions[i][0] * (SIZE - 2 * PAD), PAD + positions[i][1] * (SIZE - 2 * PAD)] as const;
  const r = n > 40 ? 11 : 15;
  const recent = new Map(frame.recent.map((c, k) => [c.from * n + c.to, { ...c, age: k }]));
  const ties: React.ReactNode[] = [];
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      if (!frame.adj[i * n + j] || recent.has(i * n + j)) continue;
      const [x1, y1] = pt(i);
      const [x2, y2] = pt(j);
      const head = arrowHead(x1, y1, x2, y2, r + 2, 14);
      ties.push(
        <G key={`t${i}-${j}`}>
          <Line x1={x1} y1={y1} x2={head.x} y2={head.y} stroke={colors.ruleStrong} strokeWidth={2} />
          <Polygon points={head.points} fill={colors.ruleStrong} />
        </G>,
      );
    }
  }
  const marks = [...recent.values()].reverse().map((c) => {
    const [x1, y1] = pt(c.from);
    const [x2, y2] = pt(c.to);
    const created = c.sign > 0;
    const colour = created ? colors.accent : colors.fail;
    const head = arrowHead(x1, y1, x2, y2, r + 2, 20);
    const mx = (x1 + x2) / 2;
    const my = (y1 + y2) / 2;
    const fade = c.age === 0 ? 1 : 0.55;
    return (
      <G key={`c${c.from}-${c.to}`} opacity={fade}>
        <Line x1={x1} y1={y1} x2={head.x} y2={head.y} stroke={colour} strokeWidth={c.age === 0 ? 7 : 4} strokeDasharray={created ? undefined : '14,10'} />
        <Polygon points={head.points} fill={colour} />
        <Circle cx={mx} cy={my} r={17} fill={colors.surface} stroke={colour} strokeWidth={3} />
        <SvgText x={mx} y={my + 10} fontSize={30} fontFamily={fonts.monoMedium} fill={colour} textAnchor="middle">
          {created ? '+' : '−'}
        </SvgText>
      </G>
    );
  });
  const actor = frame.last?.actor ?? -1;
  return (
    <View accessible accessibilityRole="image" accessibilityLabel={label} style={{ width, height: width, backgroundColor: colors.surface, borderWidth: 1, borderColor: colors.rule }}>
      <Svg width={width} height={width} viewBox={`0 0 ${SIZE} ${SIZE}`}>
        {ties}
        {marks}
        {actors.map((name, i) => {
          const [x, y] = pt(i);
          return (
            <G key={`n${i}`}>
              {i === actor ? <Circle cx={x} cy={y} r={r + 10} fill="none" stroke={colors.ink} strokeWidth={4} strokeDasharray="6,5" /> : null}
              <Circle cx={x} cy={y} r={r} fill={i === actor ? colors.ink : colors.envelopeNarrow} stroke={colors.surface} strokeWidth={3} />
              {showNames ? (
                <SvgText x={x} y={y + r + 26} fontSize={24} fontFamily={fonts.text} fill={colors.muted} textAnchor="middle">
                  {name.split(' ')[0]}
                </SvgText>
              ) : null}
            </G>
          );
        })}
      </Svg>
    </View>
  );
}
