/** The file conventions in plain words with small examples (the full rules are in shared/data.ts). */
import { View } from 'react-native';
import { Card } from '../ui/Card';
import { Text } from '../ui/Text';
import { colors } from '../ui/theme';
import { radius, space } from '../ui/tokens';

function Example({ children }: { children: string }) {
  return (
    <View style={{ backgroundColor: colors.surfaceSunk, borderRadius: radius.sm, padding: space.s1 }}>
      <Text variant="figure">{children}</Text>
    </View>
  );
}

export function FormatGuide() {
  return (
    <Card title="What the files look like" testID="format-guide">
      <Text>
        <Text variant="bodyStrong">A wave as an edge list</Text>: one tie a line, sender then receiver, by actor label. A third column may say 1 (a tie), 0 (no tie) or
        the missing marker (the pair was not observed). A first line “sender,receiver” is skipped.
      </Text>
      <Example>{'sender,receiver\nMira,Tomas\nTomas,Mira\nIlse,Mira,NA'}</Example>
      <Text>
        <Text variant="bodyStrong">A wave as a 0/1 matrix</Text>: actor labels in the first row (after an empty corner) and the first column, in the same order; 1 a tie,
        0 none, the diagonal 0.
      </Text>
      <Example>{',Mira,Tomas,Ilse\nMira,0,1,0\nTomas,1,0,0\nIlse,NA,0,0'}</Example>
      <Text>
        <Text variant="bodyStrong">The actors file</Text>: a header whose first column is “label”, one row per actor. A column of numbers is numeric, any other is
        categorical. A covariate that changes between waves has one column per wave, “name@1”, “name@2”, … Columns “present@1”, “present@2”, … (1 or 0) say in which
        waves an actor belongs to the group; an absent actor has no ties then and does not act.
      </Text>
      <Example>{'label,watch,years,drills@1,drills@2,present@1,present@2,present@3\nMira,Heron,4,3,5,1,1,1\nTomas,Kestrel,11,2,2,0,1,1'}</Example>
      <Text>
        <Text variant="bodyStrong">Fixed pairs</Text> (optional): pairs whose tie cannot change, such as a trainee who cannot advise the skipper. One pair a line:
        sender, receiver, the fixed value (0 never a tie, 1 always a tie), and optionally the waves it holds in (“2-3”, or “1 3”; all waves when empty). A pair fixed at
        both ends of a period never changes in it, in fits and batches alike.
      </Text>
      <Example>{'sender,receiver,value,waves\nIlse,Mira,0,\nTomas,Ilse,0,2-3'}</Example>
    </Card>
  );
}
