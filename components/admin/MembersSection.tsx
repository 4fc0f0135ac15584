import { View } from 'react-native';
import { Button } from '@/components/ui/Button';
import { Card } from '@/components/ui/Card';
import { Segmented } from '@/components/ui/Segmented';
import { ErrorNotice, Loading } from '@/components/ui/States';
import { Text } from '@/components/ui/Text';
import { whenText } from '@/components/ui/format';
import { describeError } from '@/lib/api/client';
import { roles, type Role } from '@/lib/contracts';
import { useMe } from '@/lib/queries/auth';
import { useChangeRole, useMembers, useRemoveMember } from '@/lib/queries/team';
import { useTheme } from '@/lib/theme';

export const ROLE_TEXT: Record<Role, string> = {
  admin: 'Admin: members, invitations, policy, and everything an engineer and a reviewer can do',
  engineer: 'Engineer: creates and edits designs, saves revisions, requests reviews',
  reviewer: 'Reviewer: approves revisions or requests changes',
  viewer: 'Viewer: reads designs, reviews and reports',
};

export function MembersSection({ isAdmin }: { isAdmin: boolean }) {
  const theme = useTheme();
  const me = useMe();
  const members = useMembers();
  const change = useChangeRole();
  const remove = useRemoveMember();
  if (members.isPending) return <Loading label="Loading members" />;
  if (members.isError) return <ErrorNotice error={members.error} onRetry={() => members.refetch()} />;
  const failure = change.error ?? remove.error;
  return (
    <Card
      title="Members and roles"
      subtitle={isAdmin ? 'Change a role and it applies at once.' : 'Only an admin changes roles.'}
      testID="members"
    >
      {failure ? (
        <Text color={theme.color.status.fail} accessibilityRole="alert">
          {describeError(failure)}
        </Text>
      ) : null}
      {members.data.map((m) => (
        <View
          key={m.userId}
          style={{
            gap: theme.space.s,
            paddingVertical: theme.space.s,
            borderBottomWidth: 1,
            borderBottomColor: theme.color.hairline,
          }}
          testID={`member-${m.email}`}
        >
          <View style={{ flexDirection: 'row', justifyContent: 'space-between', flexWrap: 'wrap', gap: theme.space.s }}>
            <View style={{ flexShrink: 1 }}>
              <Text weight="semibold">
                {m.name}
                {m.userId === me.data?.user.id ? ' (you)' : ''}
              </Text>
              <Text variant="caption" muted>
                {m.email} · joined {whenText(m.joinedAt)}
              </Text>
            </View>
            {!isAdmin ? (
              <Text variant="caption" weight="semibold" color={theme.color.accent}>
                {m.role}
              </Text>
            ) : null}
          </View>
          {isAdmin ? (
            <View style={{ flexDirection: 'row', flexWrap: 'wrap', gap: theme.space.s, alignItems: 'center' }}>
              <Segmented
                accessibilityLabel={`Role of ${m.name}`}
                value={m.role}
                onChange={(role) => role !== m.role && change.mutate({ userId: m.userId, role })}
                options={roles.map((r) => ({ value: r, label: r }))}
              />
              {m.userId !== me.data?.user.id ? (
                <Button
                  label="Remove"
                  variant="quiet"
                  compact
                  onPress={() => remove.mutate(m.userId)}
                  accessibilityLabel={`Remove ${m.name} from the team`}
                />
              ) : null}
            </View>
          ) : null}
        </View>
      ))}
      <View style={{ gap: 2 }}>
        {roles.map((r) => (
          <Text key={r} variant="caption" muted>
            {ROLE_TEXT[r]}
          </Text>
        ))}
      </View>
    </Card>
  );
}
