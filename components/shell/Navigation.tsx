import { usePathname, useRouter } from 'expo-router';
import { Pressable, View } from 'react-native';
import { useSafeAreaInsets } from 'react-native-safe-area-context';
import { Icon } from '@/components/ui/Icon';
import { Text } from '@/components/ui/Text';
import { isHovered } from '@/components/ui/webProps';
import { useTheme } from '@/lib/theme';
import { navItems } from './navItems';

/** Wide and medium screens: a rail down the left with the destinations. */
export function NavRail({ compact = false }: { compact?: boolean }) {
  const theme = useTheme();
  const pathname = usePathname();
  const router = useRouter();
  return (
    <View
      testID="nav-rail"
      role="navigation"
      accessibilityLabel="Main navigation"
      style={{
        width: compact ? 88 : 208,
        paddingVertical: theme.space.m,
        paddingHorizontal: theme.space.s,
        gap: 4,
        borderRightWidth: 1,
        borderRightColor: theme.color.hairline,
        backgroundColor: theme.color.card,
      }}
    >
      {navItems.map((item) => {
        const active = item.matches(pathname);
        return (
          <Pressable
            key={item.key}
            onPress={() => router.push(item.href as never)}
            accessibilityRole="link"
            accessibilityLabel={item.label}
            accessibilityState={{ selected: active }}
            testID={`nav-${item.key}`}
            style={(state) => {
              const hovered = isHovered(state);
              return {
                flexDirection: compact ? 'column' : 'row',
                alignItems: 'center',
                gap: compact ? 2 : theme.space.m,
                minHeight: compact ? 56 : 44,
                paddingHorizontal: theme.space.m,
                paddingVertical: compact ? 6 : 0,
                borderRadius: theme.radius,
                backgroundColor: active ? theme.color.accentSoft : hovered ? theme.color.paper : 'transparent',
              };
            }}
          >
            <Icon name={item.icon} size={22} color={active ? theme.color.accent : theme.color.mutedInk} />
            <Text
              variant={compact ? 'caption' : 'body'}
              weight={active ? 'semibold' : 'regular'}
              color={active ? theme.color.accent : theme.color.ink}
            >
              {item.label}
            </Text>
          </Pressable>
        );
      })}
    </View>
  );
}

/** Phones: a tab bar along the bottom, every target at least 44 px. */
export function NavTabs() {
  const theme = useTheme();
  const pathname = usePathname();
  const router = useRouter();
  const insets = useSafeAreaInsets();
  return (
    <View
      testID="nav-tabs"
      accessibilityRole="tablist"
      accessibilityLabel="Main navigation"
      style={{
        flexDirection: 'row',
        borderTopWidth: 1,
        borderTopColor: theme.color.hairline,
        backgroundColor: theme.color.card,
        paddingBottom: insets.bottom,
      }}
    >
      {navItems.map((item) => {
        const active = item.matches(pathname);
        return (
          <Pressable
            key={item.key}
            onPress={() => router.push(item.href as never)}
            accessibilityRole="tab"
            accessibilityLabel={item.label}
            accessibilityState={{ selected: active }}
            testID={`tab-${item.key}`}
            style={{ flex: 1, minHeight: 56, alignItems: 'center', justifyContent: 'center', gap: 2, paddingVertical: 6 }}
          >
            <Icon name={item.icon} size={22} color={active ? theme.color.accent : theme.color.mutedInk} />
            <Text
              variant="caption"
              weight={active ? 'semibold' : 'regular'}
              color={active ? theme.color.accent : theme.color.mutedInk}
            >
              {item.label}
            </Text>
          </Pressable>
        );
      })}
    </View>
  );
}
