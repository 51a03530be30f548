import { ScrollView, View } from 'react-native';
import { Text } from '../ui/Text';
import { colors } from '../ui/theme';
import { radius, space } from '../ui/tokens';
import { fixed, highCorrelation } from './format';

/**
 * The correlations of the estimates as a heat grid: every cell shows its number; the shade grows with
 * |r| (teal for positive, warm for negative), and pairs beyond |r| > 0.9 carry the word "high" and are
 * listed below the grid, so nothing depends on colour alone. Parameters are numbered, with a legend,
 * so the grid stays readable on a phone (it scrolls sideways when it must).
 */
export function CorrelationGrid({ labels, matrix, testID }: { labels: string[]; matrix: (number | null)[][]; testID?: string }) {
  const p = labels.length;
  const cell = 64;
  const shade = (r: number | null, diagonal: boolean) => {
    if (diagonal) return colors.surfaceSunk;
    if (r == null) return colors.surface;
    const a = Math.min(1, Math.abs(r));
    // Mix with the surface: alpha from 0.08 (near 0) to 0.75 (near 1).
    const alpha = 0.08 + 0.67 * a * a;
    const rgb = r >= 0 ? '14,110,110' : '162,59,59';
    return `rgba(${rgb},${alpha.toFixed(3)})`;
  };
  const high: string[] = [];
  for (let i = 0; i < p; i++) for (let j = 0; j < i; j++) if (highCorrelation(matrix[i][j])) high.push(`${labels[i]} and ${labels[j]} (${fixed(matrix[i][j], 2)})`);
  return (
    <View style={{ gap: space.s2 }} testID={testID}>
      <ScrollView horizontal contentContainerStyle={{ flexGrow: 0 }}>
        <View role="table" accessibilityLabel="Correlations of the estimates">
          <View role="row" style={{ flexDirection: 'row' }}>
            <View style={{ width: 36 }} />
            {labels.map((_, j) => (
              <View key={j} role="columnheader" style={{ width: cell, alignItems: 'center', paddingBottom: space.half }}>
                <Text variant="label">{j + 1}</Text>
              </View>
            ))}
          </View>
          {labels.map((label, i) => (
            <View key={i} role="row" style={{ flexDirection: 'row' }}>
              <View role="rowheader" style={{ width: 36, justifyContent: 'center' }} accessibilityLabel={label}>
                <Text variant="label">{i + 1}</Text>
              </View>
              {labels.map((other, j) => {
                const r = matrix[i][j];
                const flagged = i !== j && highCorrelation(r);
                const strong = r != null && Math.abs(r) > 0.55 && i !== j;
                return (
                  <View
                    key={j}
                    role="cell"
                    accessibilityLabel={i === j ? `${label} with itself` : `${label} with ${other}: ${fixed(r, 2)}${flagged ? ', high' : ''}`}
                    style={{
                      width: cell,
                      height: 48,
                      alignItems: 'center',
                      justifyContent: 'center',
                      backgroundColor: shade(r, i === j),
                      borderWidth: flagged ? 2 : 1,
                      borderColor: flagged ? colors.ink : colors.rule,
                      borderRadius: radius.sm,
                      margin: 1,
                    }}
                  >
                    <Text variant="figure" style={{ color: strong ? colors.onAccent : colors.ink, fontSize: 13 }}>
                      {i === j ? '1' : fixed(r, 2)}
                    </Text>
                    {flagged ? (
                      <Text variant="caption" style={{ color: strong ? colors.onAccent : colors.ink, fontSize: 11, lineHeight: 13 }}>
                        high
                      </Text>
                    ) : null}
                  </View>
                );
              })}
            </View>
          ))}
        </View>
      </ScrollView>
      <View style={{ gap: 2 }}>
        {labels.map((label, i) => (
          <Text key={i} variant="caption">
            <Text variant="label">{i + 1}</Text> {label}
          </Text>
        ))}
      </View>
      {high.length ? (
        <Text variant="small" testID="high-correlations">
          <Text variant="label">Highly correlated (|r| &gt; 0.9): </Text>
          {high.join('; ')}. Such pairs explain much the same thing; consider dropping or fixing one of them.
        </Text>
      ) : (
        <Text variant="caption">No pair of estimates is correlated beyond |r| = 0.9.</Text>
      )}
    </View>
  );
}
