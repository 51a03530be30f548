/**
 * A decorative sketch for the signed-out pages: simulated envelopes (wide and narrow bands)
 * around an observed line, the picture Wavefit is about. Made-up values, not data.
 */
import Svg, { Circle, Line, Path } from 'react-native-svg';
import { colors } from '../ui/theme';

const xs = [16, 58, 100, 142, 184, 226, 268, 310];
const mid = [112, 86, 70, 64, 72, 92, 114, 128];
const wide = [24, 28, 30, 32, 32, 30, 28, 24];
const observedOffset = [6, -10, 4, 12, -8, 5, -14, 7];

function band(half: number[], scale: number): string {
  const top = xs.map((x, i) => `${x},${mid[i] - half[i] * scale}`);
  const bottom = xs.map((x, i) => `${x},${mid[i] + half[i] * scale}`).reverse();
  return `M${top.join(' L')} L${bottom.join(' L')} Z`;
}

export function EnvelopeSketch({ width = 326 }: { width?: number }) {
  const observed = xs.map((x, i) => ({ x, y: mid[i] + observedOffset[i] }));
  return (
    <Svg width={width} height={(width * 170) / 326} viewBox="0 0 326 170" aria-hidden accessibilityElementsHidden importantForAccessibility="no-hide-descendants">
      {[40, 80, 120, 160].map((y) => (
        <Line key={y} x1={8} x2={318} y1={y} y2={y} stroke={colors.rule} strokeWidth={1} />
      ))}
      <Path d={band(wide, 1)} fill={colors.envelopeWide} fillOpacity={0.35} />
      <Path d={band(wide, 0.5)} fill={colors.envelopeNarrow} fillOpacity={0.35} />
      <Path d={`M${observed.map((p) => `${p.x},${p.y}`).join(' L')}`} stroke={colors.accent} strokeWidth={2.5} fill="none" strokeLinejoin="round" />
      {observed.map((p) => (
        <Circle key={p.x} cx={p.x} cy={p.y} r={4.5} fill={colors.surface} stroke={colors.accent} strokeWidth={2.5} />
      ))}
    </Svg>
  );
}
