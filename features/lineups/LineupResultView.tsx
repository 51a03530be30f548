/** A lineup's result in words: x of K found the observed wave, the binomial p-value and the caution. */
import { View } from 'react-native';
import type { LineupResult } from '../../shared/lineups';
import { Banner } from '../ui/Banner';
import { Text } from '../ui/Text';
import { space } from '../ui/tokens';

export function LineupResultView({ result, testID }: { result: LineupResult; testID?: string }) {
  return (
    <View style={{ gap: space.half }} testID={testID}>
      <Text>{result.reading}</Text>
      {result.caution ? <Banner tone="caution">{result.caution}</Banner> : null}
    </View>
  );
}
