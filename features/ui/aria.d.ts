/**
 * ARIA properties that react-native-web passes through to the DOM but React Native's own types
 * do not list. Used only where the web target needs them (linking error text to inputs, sort
 * state of table headers, keys on a focused slider track).
 */
import 'react-native';

declare module 'react-native' {
  interface TextInputProps {
    'aria-describedby'?: string;
    'aria-invalid'?: boolean;
    'aria-required'?: boolean;
  }
  interface ViewProps {
    'aria-describedby'?: string;
    'aria-sort'?: 'ascending' | 'descending' | 'none';
    'aria-current'?: 'page' | 'true' | 'false';
    'aria-level'?: number;
    /** Keys pressed while the view has focus (react-native-web; the consensus threshold track). */
    onKeyDown?: (e: { nativeEvent: { key: string }; preventDefault?: () => void }) => void;
  }
  interface TextProps {
    'aria-level'?: number;
  }
}
