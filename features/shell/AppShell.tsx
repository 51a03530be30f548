/**
 * The signed-in frame: a side bar on a medium or wide window, tabs at the bottom on a phone
 * (features/ui/breakpoints.ts decides). The outbox entry appears only to a site admin, and only
 * when the server's health answer says it mounts the development outbox.
 */
import { Link, usePathname } from 'expo-router';
import { Pressable, View } from 'react-native';
import { useSafeAreaInsets } from 'react-native-safe-area-context';
import { useSession } from '../auth/session';
import { showsOutbox, useHealth } from '../dev/queries';
import { navigationOf } from '../ui/breakpoints';
import { Icon, type IconName } from '../ui/icons';
import { Text } from '../ui/Text';
import { colors } from '../ui/theme';
import { fonts, layout, radius, space } from '../ui/tokens';
import { useBreakpoint } from '../ui/useBreakpoint';
import { useInteraction } from '../ui/useInteraction';
import { Wordmark } from '../ui/Wordmark';

interface NavItem {
  href: string;
  label: string;
  icon: IconName;
  isActive: (path: string) => boolean;
}

const baseItems: NavItem[] = [
  { href: '/', label: 'Studies', icon: 'studies', isActive: (p) => p === '/' || p.startsWith('/studies') },
  { href: '/inbox', label: 'Inbox', icon: 'mail', isActive: (p) => p.startsWith('/inbox') },
  { href: '/account', label: 'Account', icon: 'account', isActive: (p) => p.startsWith('/account') },
];
const outboxItem: NavItem = { href: '/dev/outbox', label: 'Outbox', icon: 'outbox', isActive: (p) => p.startsWith('/dev/outbox') };

function SideBarLink({ item, active }: { item: NavItem; active: boolean }) {
  const { hovered, focused, handlers } = useInteraction();
  return (
    <Link href={item.href} asChild>
      <Pressable
        {...handlers}
        accessibilityRole="link"
        accessibilityLabel={item.label}
        aria-current={active ? 'page' : undefined}
        style={{
            minHeight: 44,
            flexDirection: 'row',
            alignItems: 'center',
            gap: space.s1 + 4,
            paddingHorizontal: space.s2 - 4,
            borderRadius: radius.sm,
            borderLeftWidth: 3,
            borderLeftColor: active ? colors.accent : 'transparent',
            backgroundColor: active ? colors.accentSoft : hovered ? colors.paper : 'transparent',
            ...(focused ? { outlineColor: colors.focus, outlineWidth: 2, outlineStyle: 'solid' as const } : null),
        }}
      >
        <Icon name={item.icon} size={20} color={active ? colors.accent : colors.muted} />
        <Text style={{ fontFamily: active ? fonts.textBold : fonts.text, color: active ? colors.accent : colors.ink }}>{item.label}</Text>
      </Pressable>
    </Link>
  );
}

function TabLink({ item, active }: { item: NavItem; active: boolean }) {
  const { focused, handlers } = useInteraction();
  return (
    <Link href={item.href} asChild>
      <Pressable
        {...handlers}
        accessibilityRole="link"
        accessibilityLabel={item.label}
        aria-current={active ? 'page' : undefined}
        style={{
            flex: 1,
            minHeight: 56,
            alignItems: 'center',
            justifyContent: 'center',
            gap: 2,
            borderTopWidth: 3,
            borderTopColor: active ? colors.accent : 'transparent',
            ...(focused ? { outlineColor: colors.focus, outlineWidth: 2, outlineStyle: 'solid' as const, outlineOffset: -3 } : null),
        }}
      >
        <Icon name={item.icon} size={22} color={active ? colors.accent : colors.muted} />
        <Text variant="caption" style={{ color: active ? colors.accent : colors.muted, fontFamily: active ? fonts.textBold : fonts.text }}>
          {item.label}
        </Text>
      </Pressable>
    </Link>
  );
}

/**
 * The children (the route's navigator) always sit at the same place in the tree, whatever the
 * layout and whether the chrome is shown: moving or unmounting a navigator makes the router
 * forget the nested route. `cover` replaces the visible content (loading, errors) without
 * unmounting the children.
 */
export function AppShell({ children, cover }: { children: React.ReactNode; cover?: React.ReactNode }) {
  const { width } = useBreakpoint();
  const insets = useSafeAreaInsets();
  const pathname = usePathname() || '/';
  const { user } = useSession();
  const chrome = !cover;
  const health = useHealth(chrome && user?.isAdmin === true);
  const items = showsOutbox(user, health.data) ? [...baseItems, outboxItem] : baseItems;
  const sidebar = navigationOf(width) === 'sidebar';

  return (
    <View style={{ flex: 1, flexDirection: sidebar ? 'row' : 'column', backgroundColor: colors.paper }}>
      {chrome && sidebar ? (
        <View
          role="navigation"
          accessibilityLabel="Main"
          style={{
            width: layout.sideBarWidth,
            paddingTop: insets.top + space.s3,
            paddingBottom: insets.bottom + space.s3,
            paddingHorizontal: space.s2,
            backgroundColor: colors.surfaceSunk,
            borderRightWidth: 1,
            borderRightColor: colors.rule,
            gap: space.s4,
          }}
        >
          <Link href="/" accessibilityLabel="Wavefit, your studies" style={{ paddingHorizontal: space.half }}>
            <Wordmark />
          </Link>
          <View style={{ gap: space.half, flex: 1 }}>
            {items.map((item) => (
              <SideBarLink key={item.href} item={item} active={item.isActive(pathname)} />
            ))}
          </View>
          {user ? (
            <View style={{ gap: 2, paddingHorizontal: space.half, borderTopWidth: 1, borderTopColor: colors.rule, paddingTop: space.s2 }}>
              <Text variant="caption">Signed in as</Text>
              <Text variant="label" numberOfLines={1}>
                {user.name}
              </Text>
              <Text variant="caption" numberOfLines={1}>
                {user.email}
              </Text>
            </View>
          ) : null}
        </View>
      ) : null}
      {chrome && !sidebar ? (
        <View
          style={{
            paddingTop: insets.top + space.s1,
            paddingBottom: space.s1,
            paddingHorizontal: space.s2,
            borderBottomWidth: 1,
            borderBottomColor: colors.rule,
            backgroundColor: colors.paper,
          }}
        >
          <Link href="/" accessibilityLabel="Wavefit, your studies">
            <Wordmark />
          </Link>
        </View>
      ) : null}
      <View role="main" style={{ flex: 1, display: chrome ? 'flex' : 'none' }}>
        {children}
      </View>
      {chrome && !sidebar ? (
        <View
          role="navigation"
          accessibilityLabel="Main"
          style={{
            flexDirection: 'row',
            paddingBottom: insets.bottom,
            backgroundColor: colors.surface,
            borderTopWidth: 1,
            borderTopColor: colors.rule,
          }}
        >
          {items.map((item) => (
            <TabLink key={item.href} item={item} active={item.isActive(pathname)} />
          ))}
        </View>
      ) : null}
      {cover ? <View style={{ flex: 1 }}>{cover}</View> : null}
    </View>
  );
}
