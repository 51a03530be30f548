import { Link } from 'expo-router';
import { Text } from './Text';
import { colors } from './theme';
import { fonts } from './tokens';

/** An in-app link drawn as text (an <a href> on the web, so it opens in a new tab too). */
export function TextLink({ href, children, accessibilityLabel, variant = 'link' }: {
  href: string;
  children: React.ReactNode;
  accessibilityLabel?: string;
  variant?: 'link' | 'strong';
}) {
  return (
    <Link
      href={href}
      accessibilityRole="link"
      accessibilityLabel={accessibilityLabel}
      style={{
        color: colors.accent,
        fontFamily: fonts.textBold,
        fontSize: variant === 'strong' ? 17 : 16,
        lineHeight: 24,
        textDecorationLine: 'underline',
        textDecorationColor: colors.accent,
      }}
    >
      {children}
    </Link>
  );
}

