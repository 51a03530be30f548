import Head from 'expo-router/head';
import { View } from 'react-native';
import { Button } from '../ui/Button';
import { Heading, Text } from '../ui/Text';
import { colors } from '../ui/theme';
import { space } from '../ui/tokens';
import { WaveMark } from '../ui/Wordmark';

export function NotFoundScreen() {
  return (
    <View role="main" style={{ flex: 1, backgroundColor: colors.paper, alignItems: 'center', justifyContent: 'center', padding: space.s3, gap: space.s2 }}>
      <Head>
        <title>Page not found · Wavefit</title>
      </Head>
      <WaveMark size={56} />
      <Heading level={1} align="center">
        Page not found
      </Heading>
      <Text variant="muted" align="center" style={{ maxWidth: 420 }}>
        There is nothing at this address. The link may be mistyped or out of date.
      </Text>
      <Button label="Go to your studies" href="/" />
    </View>
  );
}
