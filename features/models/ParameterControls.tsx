/** Form widgets of the model form: estimate-or-fix with its value, and the notes beside a row. */
import { View } from 'react-native';
import { Icon } from '../ui/icons';
import { SegmentedControl } from '../ui/SegmentedControl';
import { Text } from '../ui/Text';
import { TextField } from '../ui/TextField';
import { colors } from '../ui/theme';
import { space } from '../ui/tokens';
import { useBreakpoint } from '../ui/useBreakpoint';
import type { Mode } from './modelForm';

export function RowNotes({ notes }: { notes?: { text: string; severity: 'error' | 'warning' }[] }) {
  if (!notes?.length) return null;
  return (
    <View style={{ gap: space.half }}>
      {notes.map((n, i) => (
        <View key={i} style={{ flexDirection: 'row', gap: space.half, alignItems: 'flex-start' }}>
          <View style={{ paddingTop: 2 }}>
            <Icon name={n.severity === 'error' ? 'error' : 'caution'} size={16} color={n.severity === 'error' ? colors.fail : colors.unsure} />
          </View>
          <Text variant="small" style={{ flex: 1, color: n.severity === 'error' ? colors.fail : colors.unsure }} aria-live="polite">
            <Text variant="label" style={{ color: n.severity === 'error' ? colors.fail : colors.unsure }}>
              {n.severity === 'error' ? 'Problem: ' : 'Caution: '}
            </Text>
            {n.text}
          </Text>
        </View>
      ))}
    </View>
  );
}

/** Estimate or fix, with the value field beside it. */
export function ParameterControls({
  what,
  mode,
  value,
  onMode,
  onValue,
  valueHint,
  testID,
}: {
  what: string;
  mode: Mode;
  value: string;
  onMode: (m: Mode) => void;
  onValue: (v: string) => void;
  valueHint: string;
  testID: string;
}) {
  const { compact } = useBreakpoint();
  return (
    <View style={{ flexDirection: compact ? 'column' : 'row', gap: space.s2, alignItems: compact ? 'stretch' : 'flex-end' }}>
      <SegmentedControl<Mode>
        label={`${what}: estimate or fix`}
        hideLabel
        options={[
          { value: 'estimate', label: 'Estimate', description: 'the fit finds its value' },
          { value: 'fix', label: 'Fix', description: 'keep the value you enter' },
        ]}
        value={mode}
        onChange={onMode}
      />
      <View style={{ flexGrow: 1, flexBasis: compact ? 'auto' : 200 }}>
        <TextField
          label={mode === 'estimate' ? 'Starting value (optional)' : 'Value'}
          hint={valueHint}
          value={value}
          onChangeText={onValue}
          keyboardType="numbers-and-punctuation"
          accessibilityHint={`${what}`}
          testID={testID}
        />
      </View>
    </View>
  );
}
