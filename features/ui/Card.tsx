import { View, type StyleProp, type ViewProps, type ViewStyle } from 'react-native';
import { Heading, Text } from './Text';
import { colors } from './theme';
import { radius, rule, space } from './tokens';

export interface CardProps extends ViewProps {
  title?: string;
  /** A short line under the title. */
  subtitle?: string;
  /** Controls at the right of the title (wrap below it on a phone). */
  actions?: React.ReactNode;
  padded?: boolean;
  style?: StyleProp<ViewStyle>;
  children?: React.ReactNode;
}

/** A flat card: surface colour, one thin rule, no shadow. */
export function Card({ title, subtitle, actions, padded = true, style, children, ...rest }: CardProps) {
  return (
    <View
      style={[
        {
          backgroundColor: colors.surface,
          borderColor: colors.rule,
          borderWidth: rule,
          borderRadius: radius.md,
          padding: padded ? space.s2 : 0,
          gap: space.s2,
        },
        style,
      ]}
      {...rest}
    >
      {title || actions ? (
        <View style={{ flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', justifyContent: 'space-between', gap: space.s1 }}>
          <View style={{ flexShrink: 1, gap: space.half }}>
            {title ? <Heading level={3}>{title}</Heading> : null}
            {subtitle ? <Text variant="caption">{subtitle}</Text> : null}
          </View>
          {actions}
        </View>
      ) : null}
      {children}
    </View>
  );
}

/** A thin horizontal rule. */
export function Rule({ inset = 0 }: { inset?: number }) {
  return <View style={{ height: rule, backgroundColor: colors.rule, marginHorizontal: inset }} />;
}
