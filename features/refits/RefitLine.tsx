/**
 * A short line for the compare screen: the re-fit studies that include the compared fits (with the
 * share of converged re-fits in words), or a link to start one from them.
 */
import { View } from 'react-native';
import { Text } from '../ui/Text';
import { TextLink } from '../ui/TextLink';
import { space } from '../ui/tokens';
import { useRefits } from './queries';

export function RefitLine({ studyId, fitIds }: { studyId: number; fitIds: number[] }) {
  const { data } = useRefits(studyId);
  if (fitIds.length === 0) return null;
  const related = (data?.refits ?? []).filter((r) => r.models.some((m) => fitIds.includes(m.fitId)));
  return (
    <View style={{ gap: space.half }} testID="compare-refits">
      {related.length === 0 ? (
        <Text variant="small">
          No re-fit study of these fits yet.{' '}
          <TextLink href={`/studies/${studyId}/refits?fits=${fitIds.slice(0, 4).join(',')}`}>Start one from these fits</TextLink> to see how far their estimates stray when the model is fitted again to its own simulated panels.
        </Text>
      ) : (
        related.slice(0, 3).map((r) => (
          <Text key={r.id} variant="small">
            {'Re-fit study: '}
            <TextLink href={`/studies/${studyId}/refits/${r.id}`}>{r.label}</TextLink>
            {` (${r.state === 'done' ? `${r.refitsTotal} re-fits` : `${r.state}, ${r.refitsDone} of ${r.refitsTotal}`})`}
          </Text>
        ))
      )}
    </View>
  );
}
