import { Text as RNText, type TextProps } from 'react-native';
import { colors, text, type ColorRole, type TextVariant } from './theme';

export interface UITextProps extends TextProps {
  variant?: TextVariant;
  color?: ColorRole;
  align?: 'left' | 'center' | 'right';
}

/** Text in one of the theme's text styles. */
export function Text({ variant = 'body', color, align, style, ...rest }: UITextProps) {
  return (
    <RNText
      style={[text[variant], color ? { color: colors[color] } : null, align ? { textAlign: align } : null, style]}
      {...rest}
    />
  );
}

const headingVariant = { 1: 'title', 2: 'heading', 3: 'bodyStrong' } as const;

/** A heading: level 1 is the screen title, 2 a section, 3 a card title. */
export function Heading({ level = 2, variant, ...rest }: UITextProps & { level?: 1 | 2 | 3 }) {
  return <Text role="heading" aria-level={level} variant={variant ?? headingVariant[level]} {...rest} />;
}
