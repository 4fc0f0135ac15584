import { useLocalSearchParams, useRouter } from 'expo-router';
import { View } from 'react-native';
import { MailList } from '@/components/mail/MailList';
import { Card } from '@/components/ui/Card';
import { Segmented } from '@/components/ui/Segmented';
import { EmptyState, ErrorNotice, Loading } from '@/components/ui/States';
import { Screen } from '@/components/ui/Screen';
import { Text } from '@/components/ui/Text';
import { can, useActiveTeam, useMe } from '@/lib/queries/auth';
import { useOutbox } from '@/lib/queries/team';
import { useTheme } from '@/lib/theme';
import { AuditSection } from './AuditSection';
import { InvitationsSection } from './InvitationsSection';
import { MembersSection } from './MembersSection';
import { PolicySection } from './PolicySection';

type Section = 'members' | 'invitations' | 'policy' | 'outbox' | 'audit';

const ADMIN_SECTIONS: { value: Section; label: string }[] = [
  { value: 'members', label: 'Members' },
  { value: 'invitations', label: 'Invitations' },
  { value: 'policy', label: 'Derating policy' },
  { value: 'outbox', label: 'Mail outbox' },
  { value: 'audit', label: 'Audit log' },
];

export function TeamScreen() {
  const theme = useTheme();
  const router = useRouter();
  const { section: raw } = useLocalSearchParams<{ section?: string }>();
  const me = useMe();
  const { team } = useActiveTeam(me.data);
  const isAdmin = can(team?.role, 'admin');
  const sections = isAdmin ? ADMIN_SECTIONS : ADMIN_SECTIONS.filter((s) => s.value === 'members' || s.value === 'policy');
  const section = (sections.find((s) => s.value === raw)?.value ?? 'members') as Section;

  return (
    <Screen
      title="Team"
      subtitle={team ? `${team.name} · you are ${team.role === 'admin' ? 'an' : 'a'} ${team.role}` : undefined}
      testID="team-screen"
      maxWidth={1100}
    >
      <Segmented
        accessibilityLabel="Team section"
        testID="team-sections"
        value={section}
        onChange={(v) => router.setParams({ section: v })}
        options={sections}
      />
      {!isAdmin ? (
        <Text variant="caption" muted>
          Invitations, the mail outbox and the audit log are for admins.
        </Text>
      ) : null}
      <View style={{ gap: theme.space.m }}>
        {section === 'members' ? <MembersSection isAdmin={isAdmin} /> : null}
        {section === 'invitations' && isAdmin ? <InvitationsSection /> : null}
        {section === 'policy' ? <PolicySection isAdmin={isAdmin} /> : null}
        {section === 'outbox' && isAdmin ? <OutboxSection /> : null}
        {section === 'audit' && isAdmin ? <AuditSection /> : null}
      </View>
    </Screen>
  );
}

function OutboxSection() {
  const outbox = useOutbox();
  return (
    <Card
      title="Mail outbox"
      subtitle="Every message this install sent for the team, newest first. On a local install they are captured here instead of leaving the machine."
      testID="outbox"
    >
      {outbox.isPending ? (
        <Loading label="Loading the outbox" />
      ) : outbox.isError ? (
        <ErrorNotice error={outbox.error} onRetry={() => outbox.refetch()} />
      ) : outbox.data.length === 0 ? (
        <EmptyState icon="mail" title="No messages sent yet." />
      ) : (
        <MailList messages={outbox.data} showRecipient testID="outbox-list" />
      )}
    </Card>
  );
}
