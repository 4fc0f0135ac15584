import { useRouter } from 'expo-router';
import type { ReactNode } from 'react';
import { Pressable, View } from 'react-native';
import { useSafeAreaInsets } from 'react-native-safe-area-context';
import { Icon } from '@/components/ui/Icon';
import { Menu } from '@/components/ui/Menu';
import { Text } from '@/components/ui/Text';
import { useActiveTeam, useSignOut, type Me } from '@/lib/queries/auth';
import { useLayout, useTheme } from '@/lib/theme';
import { Logo } from './Logo';
import { NavRail, NavTabs } from './Navigation';

const ROLE_WORD = { admin: 'Admin', engineer: 'Engineer', reviewer: 'Reviewer', viewer: 'Viewer' } as const;

/**
 * The signed-in frame: a header (name, team switcher, user menu), the main column, and the
 * navigation — a tab bar along the bottom of a phone, a rail down the left of anything wider.
 */
export function AppShell({ me, children }: { me: Me; children: ReactNode }) {
  const theme = useTheme();
  const layout = useLayout();
  const insets = useSafeAreaInsets();
  return (
    <View testID="app-shell" style={{ flex: 1, backgroundColor: theme.color.paper, paddingTop: insets.top }}>
      <Header me={me} />
      <View style={{ flex: 1, flexDirection: 'row', minHeight: 0 }}>
        {layout.isNarrow ? null : <NavRail compact={!layout.isWide} />}
        <View role="main" testID="app-main" style={{ flex: 1, minWidth: 0 }}>
          {children}
        </View>
      </View>
      {layout.isNarrow ? <NavTabs /> : null}
    </View>
  );
}

function Header({ me }: { me: Me }) {
  const theme = useTheme();
  const layout = useLayout();
  const router = useRouter();
  const { team, teams, choose } = useActiveTeam(me);
  const signOut = useSignOut();
  const initials = me.user.name
    .split(/\s+/)
    .map((p) => p[0])
    .filter(Boolean)
    .slice(0, 2)
    .join('')
    .toUpperCase();

  return (
    <View
      testID="app-header"
      accessibilityRole="header"
      style={{
        height: 56,
        flexDirection: 'row',
        alignItems: 'center',
        gap: theme.space.m,
        paddingHorizontal: layout.isNarrow ? theme.space.m : theme.space.l,
        backgroundColor: theme.color.card,
        borderBottomWidth: 1,
        borderBottomColor: theme.color.hairline,
        zIndex: 2,
      }}
    >
      <Pressable
        accessibilityRole="link"
        accessibilityLabel="Ringwell, go to designs"
        onPress={() => router.push('/designs')}
        style={{ flexDirection: 'row', alignItems: 'center', gap: 8, minHeight: 44 }}
      >
        <Logo />
        <Text variant="title" weight="semibold">
          Ringwell
        </Text>
      </Pressable>

      <View style={{ flex: 1 }} />

      <Menu
        accessibilityLabel="Choose a team"
        testID="team-menu"
        entries={teams.map((t) => ({
          key: t.id,
          label: t.name,
          detail: ROLE_WORD[t.role] ?? t.role,
          selected: t.id === team?.id,
          onPress: () => choose(t.id),
        }))}
        trigger={(open) => (
          <Pressable
            onPress={open}
            testID="team-switcher"
            accessibilityRole="button"
            accessibilityLabel={`Team: ${team?.name ?? 'none'}. Change team`}
            style={{
              flexDirection: 'row',
              alignItems: 'center',
              gap: 4,
              minHeight: 44,
              paddingHorizontal: theme.space.s,
              borderRadius: theme.radius,
              flexShrink: 1,
            }}
          >
            <View style={{ flexShrink: 1 }}>
              <Text weight="semibold" numberOfLines={1}>
                {team?.name ?? 'No team'}
              </Text>
              {layout.isNarrow ? null : (
                <Text variant="caption" muted numberOfLines={1}>
                  {team ? ROLE_WORD[team.role] : 'Ask an admin for an invitation'}
                </Text>
              )}
            </View>
            <Icon name="chevron-down" size={16} color={theme.color.mutedInk} />
          </Pressable>
        )}
      />

      <Menu
        accessibilityLabel="Account"
        testID="user-menu"
        header={
          <View>
            <Text weight="semibold">{me.user.name}</Text>
            <Text variant="caption" muted>
              {me.user.email}
            </Text>
          </View>
        }
        entries={[
          { key: 'mail', label: 'My mail', onPress: () => router.push('/mail') },
          {
            key: 'sign-out',
            label: 'Sign out',
            tone: 'danger',
            onPress: () => signOut.mutate(undefined, { onSettled: () => router.replace('/sign-in') }),
          },
        ]}
        trigger={(open) => (
          <Pressable
            onPress={open}
            testID="user-menu-button"
            accessibilityRole="button"
            accessibilityLabel={`Account menu for ${me.user.name}`}
            style={{ width: 44, height: 44, alignItems: 'center', justifyContent: 'center' }}
          >
            <View
              style={{
                width: 34,
                height: 34,
                borderRadius: 17,
                backgroundColor: theme.color.accentSoft,
                alignItems: 'center',
                justifyContent: 'center',
              }}
            >
              <Text weight="semibold" color={theme.color.accent} variant="body">
                {initials || '?'}
              </Text>
            </View>
          </Pressable>
        )}
      />
    </View>
  );
}
