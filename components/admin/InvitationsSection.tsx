import { useState } from 'react';
import { View } from 'react-native';
import { Button } from '@/components/ui/Button';
import { Card } from '@/components/ui/Card';
import { Chip } from '@/components/ui/Chip';
import { Segmented } from '@/components/ui/Segmented';
import { ErrorNotice, Loading } from '@/components/ui/States';
import { Text } from '@/components/ui/Text';
import { TextField } from '@/components/ui/TextField';
import { stampText } from '@/components/ui/format';
import { describeError } from '@/lib/api/client';
import { createInvitationRequestSchema, roles, type Role } from '@/lib/contracts';
import { useCreateInvitation, useInvitations, useRevokeInvitation } from '@/lib/queries/team';
import { useTheme } from '@/lib/theme';

export function InvitationsSection() {
  const theme = useTheme();
  const invitations = useInvitations();
  const create = useCreateInvitation();
  const revoke = useRevokeInvitation();
  const [email, setEmail] = useState('');
  const [role, setRole] = useState<Role>('engineer');
  const [error, setError] = useState<string | null>(null);
  const submit = () => {
    const parsed = createInvitationRequestSchema.safeParse({ email: email.trim(), role });
    if (!parsed.success) {
      setError(parsed.error.issues[0]?.message ?? 'Check the address.');
      return;
    }
    setError(null);
    create.mutate(parsed.data, { onSuccess: () => setEmail('') });
  };
  return (
    <Card
      title="Invitations"
      subtitle="An invitation is an e-mail with a link; it joins the person to this team with the role chosen here."
      testID="invitations"
    >
      <TextField
        label="E-mail address"
        value={email}
        onChangeText={setEmail}
        autoCapitalize="none"
        inputMode="email"
        error={error ?? undefined}
        testID="invite-email"
      />
      <Segmented
        accessibilityLabel="Role for the invitation"
        value={role}
        onChange={setRole}
        options={roles.map((r) => ({ value: r, label: r }))}
      />
      {create.isError ? (
        <Text color={theme.color.status.fail} accessibilityRole="alert">
          {describeError(create.error)}
        </Text>
      ) : null}
      <Button
        label="Send invitation"
        variant="primary"
        onPress={submit}
        busy={create.isPending}
        style={{ alignSelf: 'flex-start' }}
        testID="invite-send"
      />
      {invitations.isPending ? (
        <Loading label="Loading invitations" />
      ) : invitations.isError ? (
        <ErrorNotice error={invitations.error} onRetry={() => invitations.refetch()} />
      ) : invitations.data.length === 0 ? (
        <Text muted>No invitations yet.</Text>
      ) : (
        invitations.data.map((inv) => (
          <View
            key={inv.id}
            style={{
              flexDirection: 'row',
              flexWrap: 'wrap',
              alignItems: 'center',
              justifyContent: 'space-between',
              gap: theme.space.s,
              paddingVertical: theme.space.s,
              borderTopWidth: 1,
              borderTopColor: theme.color.hairline,
            }}
          >
            <View style={{ flexShrink: 1 }}>
              <Text weight="semibold">{inv.email}</Text>
              <Text variant="caption" muted>
                {inv.role} · by {inv.invitedBy?.name ?? '—'} · expires {stampText(inv.expiresAt)}
              </Text>
            </View>
            <View style={{ flexDirection: 'row', gap: theme.space.s, alignItems: 'center' }}>
              <Chip label={inv.state} tone={inv.state === 'pending' ? 'accent' : inv.state === 'accepted' ? 'pass' : 'neutral'} />
              {inv.state === 'pending' ? (
                <Button
                  label="Revoke"
                  variant="quiet"
                  compact
                  onPress={() => revoke.mutate(inv.id)}
                  accessibilityLabel={`Revoke the invitation to ${inv.email}`}
                />
              ) : null}
            </View>
          </View>
        ))
      )}
    </Card>
  );
}
