/**
 * The consensus network as an SVG node-link drawing (react-native-svg): fixed node positions from the
 * server's seeded layout, ties told apart by colour AND line style (matched solid, missed dashed,
 * extra dotted; the legend says it in words), an arrowhead at the receiver, and nodes sized by a
 * numeric covariate or shaped by a categorical one.
 */
import Svg, { G, Line, Polygon, Circle, Rect, Text as SvgText } from 'react-native-svg';
import { View } from 'react-native';
import { Text } from '../ui/Text';
import { colors } from '../ui/theme';
import { space } from '../ui/tokens';
import type { ClassifiedTie, TieKind } from './classify';

export const TIE_LOOK: Record<TieKind, { colour: string; dash?: string; width: number; word: string; explain: string }> = {
  matched: { colour: colors.accent, width: 2.2, word: 'Matched', explain: 'in the consensus and observed' },
  missed: { colour: colors.fail, dash: '9,6', width: 1.8, word: 'Missed', explain: 'observed, but below the threshold' },
  extra: { colour: colors.envelopeNarrow, dash: '2,5', width: 2, word: 'Extra', explain: 'in the consensus, not observed' },
};

export type NodeShape = 'circle' | 'square' | 'triangle' | 'diamond' | 'hexagon';
export const SHAPES: NodeShape[] = ['circle', 'square', 'triangle', 'diamond', 'hexagon'];

export interface NodeStyle {
  radius: number;
  shape: NodeShape;
  hollow: boolean;
}

const SIZE = 1000;
const PAD = 70;

function shapePoints(shape: NodeShape, x: number, y: number, r: number): string {
  const pts: [number, number][] = [];
  const poly = (n: number, start: number) => {
    for (let k = 0; k < n; k++) {
      const a = start + (2 * Math.PI * k) / n;
      pts.push([x + r * Math.cos(a), y + r * Math.sin(a)]);
    }
  };
  if (shape === 'triangle') poly(3, -Math.PI / 2);
  else if (shape === 'diamond') poly(4, -Math.PI / 2);
  else if (shape === 'hexagon') poly(6, 0);
  return pts.map((p) => p.join(',')).join(' ');
}

export function NodeGlyph({ x, y, style, fill, stroke }: { x: number; y: number; style: NodeStyle; fill: string; stroke: string }) {
  const common = { fill: style.hollow ? colors.surface : fill, stroke, strokeWidth: 2.5 };
  if (style.shape === 'circle') return <Circle cx={x} cy={y} r={style.radius} {...common} />;
  if (style.shape === 'square') return <Rect x={x - style.radius * 0.88} y={y - style.radius * 0.88} width={style.radius * 1.76} height={style.radius * 1.76} {...common} />;
  return <Polygon points={shapePoints(style.shape, x, y, style.radius * 1.15)} {...common} />;
}

export function NetworkDrawing({
  actors,
  positions,
  ties,
  nodeStyles,
  width,
  label,
}: {
  actors: string[];
  positions: Array<[number, number]>;
  ties: ClassifiedTie[];
  nodeStyles: NodeStyle[];
  width: number;
  label: string;
}) {
  const P = positions.map(([x, y]) => [PAD + x * (SIZE - 2 * PAD), PAD + y * (SIZE - 2 * PAD)] as const);
  const order: TieKind[] = ['missed', 'extra', 'matched'];
  const sorted = [...ties].sort((a, b) => order.indexOf(a.kind) - order.indexOf(b.kind));
  return (
    <View accessibilityRole="image" accessibilityLabel={label} style={{ width, height: width }} testID="consensus-drawing">
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
            // Two ties between the same pair are drawn side by side.
            const off = t.mutual ? 7 : 0;
            const ox = -uy * off;
            const oy = ux * off;
            const r1 = nodeStyles[t.from].radius + 4;
            const r2 = nodeStyles[t.to].radius + 6;
            const sx = x1 + ux * r1 + ox;
            const sy = y1 + uy * r1 + oy;
            const ex = x2 - ux * r2 + ox;
            const ey = y2 - uy * r2 + oy;
            const look = TIE_LOOK[t.kind];
            const head = 16;
            const hx = ex - ux * head;
            const hy = ey - uy * head;
            return (
              <G key={`${t.from}-${t.to}`}>
                <Line x1={sx} y1={sy} x2={hx} y2={hy} stroke={look.colour} strokeWidth={look.width * 1.6} strokeDasharray={look.dash} strokeLinecap="round" />
                <Polygon points={`${ex},${ey} ${hx - uy * 7},${hy + ux * 7} ${hx + uy * 7},${hy - ux * 7}`} fill={look.colour} />
              </G>
            );
          })}
        </G>
        <G>
          {P.map(([x, y], i) => (
            <G key={i}>
              <NodeGlyph x={x} y={y} style={nodeStyles[i]} fill={colors.ink} stroke={colors.ink} />
              <SvgText x={x + nodeStyles[i].radius + 6} y={y - nodeStyles[i].radius - 2} fontSize={26} fill={colors.ink} fontFamily="Atkinson-Regular, sans-serif">
                {actors[i]}
              </SvgText>
            </G>
          ))}
        </G>
      </Svg>
    </View>
  );
}

/** The tie legend: a line sample in the tie's style, its word and what it means. */
export function TieLegend({ counts }: { counts?: Record<TieKind, number> }) {
  return (
    <View role="list" accessibilityLabel="Tie legend" style={{ gap: space.half }}>
      {(['matched', 'missed', 'extra'] as TieKind[]).map((k) => {
        const look = TIE_LOOK[k];
        return (
          <View role="listitem" key={k} style={{ flexDirection: 'row', alignItems: 'center', gap: space.s1 }}>
            <Svg width={40} height={12} aria-hidden>
              <Line x1={2} y1={6} x2={38} y2={6} stroke={look.colour} strokeWidth={look.width + 0.5} strokeDasharray={look.dash ? look.dash.split(',').map((v) => String(Number(v) * 0.6)).join(',') : undefined} strokeLinecap="round" />
            </Svg>
            <Text variant="small">
              <Text variant="label" style={{ color: look.colour }}>
                {look.word}
              </Text>
              {` (${look.explain})${counts ? `: ${counts[k]}` : ''}`}
            </Text>
          </View>
        );
      })}
    </View>
  );
}
