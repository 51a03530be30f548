/**
 * The model form's effect picker: every effect of the catalogue with its plain explanation, one row
 * per usable covariate for the covariate effects, each included row with estimate-or-fix and its value.
 */
import { View } from 'react-native';
import type { CovariateInfo } from '../../shared/data';
import { EFFECT_CATALOGUE, type EffectId } from '../../shared/effects';
import { Card } from '../ui/Card';
import { Checkbox } from '../ui/Checkbox';
import { Text } from '../ui/Text';
import { colors } from '../ui/theme';
import { space } from '../ui/tokens';
import type { EffectRow, RowMessages } from './modelForm';
import { ParameterControls, RowNotes } from './ParameterControls';

export function EffectPicker({
  grouped,
  covariates,
  messages,
  onChange,
}: {
  /** The effect rows by effect id (one row, or one per covariate). */
  grouped: Map<EffectId, EffectRow[]>;
  covariates: CovariateInfo[];
  messages: RowMessages;
  onChange: (key: string, change: Partial<EffectRow>) => void;
}) {
  const setEffect = onChange;
  const covariatesOfKind = (kind: 'numeric' | 'categorical') => covariates.filter((c) => c.kind === kind);
  return (
    <Card title="Effects" subtitle="What makes an actor add or drop a tie. A model needs at least density.">
      <RowNotes notes={messages.byRow.__effects} />
      {EFFECT_CATALOGUE.map((info) => {
        const rows = grouped.get(info.id) ?? [];
        const needs = info.covariate;
        return (
          <View key={info.id} style={{ gap: space.s1, paddingBottom: space.s1, borderBottomWidth: 1, borderBottomColor: colors.rule }} testID={`effect-group-${info.id}`}>
            {needs === 'none' ? null : (
              <View style={{ gap: 2 }}>
                <Text variant="bodyStrong">{info.label}</Text>
                <Text variant="caption">{info.explanation}</Text>
                {covariatesOfKind(needs).length === 0 ? (
                  <Text variant="caption" style={{ fontStyle: 'italic' }}>
                    This study has no {needs} covariate, so this effect cannot be used.
                  </Text>
                ) : (
                  <Text variant="caption">Choose the {needs} covariates to use it with:</Text>
                )}
              </View>
            )}
            {rows.map((row) => (
              <View key={row.key} style={{ gap: space.s1, paddingLeft: needs === 'none' ? 0 : space.s2 }}>
                <Checkbox
                  label={needs === 'none' ? info.label : `with ${row.covariate}`}
                  hint={needs === 'none' ? info.explanation : undefined}
                  checked={row.included}
                  onChange={(included) => setEffect(row.key, { included })}
                  testID={`effect-${row.key}`}
                />
                {row.included ? (
                  <View style={{ paddingLeft: 30 }}>
                    <ParameterControls
                      what={needs === 'none' ? info.label : `${info.label} with ${row.covariate}`}
                      mode={row.mode}
                      value={row.value}
                      onMode={(mode) => setEffect(row.key, { mode })}
                      onValue={(value) => setEffect(row.key, { value })}
                      valueHint={
                        row.mode === 'estimate'
                          ? row.id === 'density'
                            ? 'Left empty, the fit starts from the observed density.'
                            : 'Left empty, the fit starts from 0.'
                          : `Between \u221240 and 40.`
                      }
                      testID={`effect-value-${row.key}`}
                    />
                  </View>
                ) : null}
                <RowNotes notes={messages.byRow[row.key]} />
              </View>
            ))}
          </View>
        );
      })}
    </Card>
  );
}
