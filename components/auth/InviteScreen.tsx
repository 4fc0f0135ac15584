import { useRouter } from 'expo-router';
import { useState } from 'react';
import { ScrollView, View } from 'react-native';
import { Logo } from '@/components/shell/Logo';
import { Button } from '@/components/ui/Button';
import { Card } from '@/components/ui/Card';
import { ErrorNotice, Loading } from '@/components/ui/States';
import { Text } from '@/components/ui/Text';
import { TextField } from '@/components/ui/TextField';
import { stampText } from '@/components/ui/format';
import { describeError } from '@/lib/api/client';
import { signUpRequestSchema } from '@/lib/contracts';
import { useMe } from '@/lib/queries/auth';
import { useAcceptInvitation, useInvitation, useSignUp } from '@/lib/queries/team';
import { useLayout, useTheme } from '@/lib/theme';
import { flatten } from './SignInScreen';

/** An invitation link: who invites whom to which team, accepted from an existing or a new account. */
export function InviteScreen({ token }: { token: string }) {
  const theme = useTheme();
  const layout = useLayout();
  const router = useRouter();
  const me = useMe();
  const invitation = useInvitation(token);
  const accept = useAcceptInvitation(token);
  const signUp = useSignUp();
  const [name, setName] = useState('');
  const [password, setPassword] = useState('');
  const [errors, setErrors] = useState<Record<string, string>>({});

  const body = () => {
    if (invitation.isPending || me.isPending) return <Loading label="Opening the invitation" />;
    if (invitation.isError) return <ErrorNotice error={invitation.error} title="This invitation cannot be used." />;
    const inv = invitation.data;
    const intro = (
      <Text>
        {inv.inviter?.name ?? 'An admin'} invites {inv.email} to join <Text weight="semibold">{inv.team.name}</Text> as{' '}
        {inv.role === 'admin' || inv.role === 'engineer' ? 'an' : 'a'} {inv.role}. The link works until {stampText(inv.expiresAt)}
        .
      </Text>
    );
    if (me.data) {
      return (
        <Card title="Join the team">
          {intro}
          <Text muted>You are signed in as {me.data.user.email}.</Text>
          {accept.isError ? <Text color={theme.color.status.fail}>{describeError(accept.error)}</Text> : null}
          <Button
            label={`Join ${inv.team.name}`}
            variant="primary"
            busy={accept.isPending}
            onPress={() => accept.mutate(undefined, { onSuccess: () => router.replace('/designs') })}
            testID="accept-invitation"
          />
        </Card>
      );
    }
    const submit = () => {
      const parsed = signUpRequestSchema.safeParse({ name, email: inv.email, password, invitationToken: token });
      if (!parsed.success) {
        setErrors(flatten(parsed.error));
        return;
      }
      setErrors({});
      signUp.mutate(parsed.data, { onSuccess: () => router.replace('/designs') });
    };
    return (
      <Card title="Create your account">
        {intro}
        <TextField
          label="Your name"
          value={name}
          onChangeText={setName}
          error={errors.name}
          autoComplete="name"
          testID="signup-name"
        />
        <TextField label="E-mail" value={inv.email} editable={false} hint="The invitation is for this address." />
        <TextField
          label="Password"
          value={password}
          onChangeText={setPassword}
          secureTextEntry
          error={errors.password}
          hint="At least 10 characters."
          autoComplete="new-password"
          testID="signup-password"
        />
        {signUp.isError ? <Text color={theme.color.status.fail}>{describeError(signUp.error)}</Text> : null}
        <Button
          label="Create account and join"
          variant="primary"
          busy={signUp.isPending}
          onPress={submit}
          testID="signup-submit"
        />
        <Button
          label="I already have an account"
          variant="quiet"
          onPress={() => router.push({ pathname: '/sign-in', params: { next: `/invite/${token}` } })}
        />
      </Card>
    );
  };

  return (
    <ScrollView
      contentContainerStyle={{
        flexGrow: 1,
        justifyContent: 'center',
        padding: layout.isNarrow ? theme.space.l : theme.space.xxl,
      }}
    >
      <View style={{ width: '100%', maxWidth: 480, alignSelf: 'center', gap: theme.space.xl }} testID="invite-screen">
        <View style={{ flexDirection: 'row', alignItems: 'center', gap: theme.space.m }}>
          <Logo size={36} />
          <Text variant="display">Ringwell</Text>
        </View>
        {body()}
      </View>
    </ScrollView>
  );
}
