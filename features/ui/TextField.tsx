import { useId, useState } from 'react';
import { TextInput, View, type TextInputProps } from 'react-native';
import { Icon } from './icons';
import { Text } from './Text';
import { colors } from './theme';
import { fontSize, fonts, lineHeight, radius, space, touchTarget } from './tokens';

export interface TextFieldProps extends Omit<TextInputProps, 'style' | 'accessibilityLabel'> {
  label: string;
  /** A validation message; shown under the field and linked to it for screen readers. */
  error?: string;
  /** A hint under the label (format, rules). */
  hint?: string;
  multiline?: boolean;
  required?: boolean;
  ref?: React.Ref<TextInput>;
}

/**
 * A labelled text input. On the web the input gets aria-label from the label and
 * aria-describedby pointing at the hint and the error message, so a screen reader reads both.
 */
export function TextField({ label, error, hint, multiline, required, onFocus, onBlur, ref, ...rest }: TextFieldProps) {
  const id = useId().replace(/[^a-zA-Z0-9_-]/g, '');
  const hintId = `hint-${id}`;
  const errorId = `error-${id}`;
  const [focused, setFocused] = useState(false);
  const describedBy = [hint ? hintId : null, error ? errorId : null].filter(Boolean).join(' ') || undefined;
  return (
    <View style={{ gap: space.half }}>
      <Text variant="label" nativeID={`label-${id}`}>
        {label}
        {required ? <Text variant="caption"> (required)</Text> : null}
      </Text>
      {hint ? (
        <Text variant="caption" nativeID={hintId}>
          {hint}
        </Text>
      ) : null}
      <TextInput
        ref={ref}
        accessibilityLabel={label}
        aria-describedby={describedBy}
        aria-invalid={error ? true : undefined}
        aria-required={required ? true : undefined}
        placeholderTextColor={colors.muted}
        multiline={multiline}
        onFocus={(e) => {
          setFocused(true);
          onFocus?.(e);
        }}
        onBlur={(e) => {
          setFocused(false);
          onBlur?.(e);
        }}
        style={{
          minHeight: multiline ? touchTarget * 2.5 : touchTarget,
          paddingHorizontal: 12,
          paddingVertical: multiline ? 10 : 0,
          textAlignVertical: multiline ? 'top' : 'center',
          backgroundColor: colors.surface,
          borderWidth: error ? 2 : 1,
          borderColor: error ? colors.fail : focused ? colors.accent : colors.ruleStrong,
          borderRadius: radius.sm,
          fontFamily: fonts.text,
          fontSize: fontSize.body,
          lineHeight: lineHeight.body,
          color: colors.ink,
          outlineColor: colors.focus,
          outlineWidth: focused ? 2 : 0,
          outlineStyle: 'solid',
          outlineOffset: 1,
        }}
        {...rest}
      />
      {error ? (
        <View style={{ flexDirection: 'row', gap: space.half, alignItems: 'flex-start' }}>
          <View style={{ paddingTop: 2 }}>
            <Icon name="caution" size={16} color={colors.fail} />
          </View>
          <Text variant="small" nativeID={errorId} aria-live="polite" style={{ color: colors.fail, flex: 1 }}>
            {error}
          </Text>
        </View>
      ) : null}
    </View>
  );
}
