import { useLocalSearchParams, useRouter } from 'expo-router';
import { useRef, useState } from 'react';
import { Pressable, ScrollView, TextInput, View } from 'react-native';
import { z } from 'zod';
import { Logo } from '@/components/shell/Logo';
import { Button } from '@/components/ui/Button';
import { Card } from '@/components/ui/Card';
import { Text } from '@/components/ui/Text';
import { TextField } from '@/components/ui/TextField';
import { describeError } from '@/lib/api/client';
import { signInRequestSchema } from '@/lib/contracts/auth';
import { useDemoAccounts, useSignIn } from '@/lib/queries/auth';
import { isHovered } from '@/components/ui/webProps';
import { useLayout, useTheme } from '@/lib/theme';

const ROLE_WORD = { admin: 'admin', engineer: 'engineer', reviewer: 'reviewer', viewer: 'viewer' } as const;

export function SignInScreen() {
  const theme = useTheme();
  const layout = useLayout();
  const router = useRouter();
  const { next } = useLocalSearchParams<{ next?: string }>();
  const [email, setEmail] = useState('');
  const [password, setPassword] = useState('');
  const [fieldErrors, setFieldErrors] = useState<Record<string, string>>({});
  const signIn = useSignIn();
  const demo = useDemoAccounts();
  const passwordRef = useRef<TextInput>(null);

  const submit = () => {
    const parsed = signInRequestSchema.safeParse({ email: email.trim(), password });
    if (!parsed.success) {
      setFieldErrors(flatten(parsed.error));
      return;
    }
    setFieldErrors({});
    signIn.mutate(parsed.data, {
      onSuccess: () => router.replace((typeof next === 'string' && next.startsWith('/') ? next : '/designs') as never),
    });
  };

  return (
    <ScrollView
      contentContainerStyle={{
        flexGrow: 1,
        justifyContent: 'center',
        padding: layout.isNarrow ? theme.space.l : theme.space.xxl,
      }}
      keyboardShouldPersistTaps="handled"
    >
      <View testID="sign-in" style={{ width: '100%', maxWidth: 440, alignSelf: 'center', gap: theme.space.xl }}>
        <View style={{ flexDirection: 'row', alignItems: 'center', gap: theme.space.m }}>
          <Logo size={40} />
          {/* flexShrink lets the tagline wrap beside the logo on a phone instead of running off. */}
          <View style={{ flexShrink: 1 }}>
            <Text variant="display" accessibilityRole="header">
              Ringwell
            </Text>
            <Text muted>Power-up and switching transients, checked against their ratings.</Text>
          </View>
        </View>

        <Card title="Sign in">
          <TextField
            label="E-mail"
            testID="sign-in-email"
            value={email}
            onChangeText={setEmail}
            autoCapitalize="none"
            autoComplete="email"
            inputMode="email"
            keyboardType="email-address"
            returnKeyType="next"
            onSubmitEditing={() => passwordRef.current?.focus()}
            error={fieldErrors.email}
          />
          <TextField
            ref={passwordRef}
            label="Password"
            testID="sign-in-password"
            value={password}
            onChangeText={setPassword}
            secureTextEntry
            autoComplete="current-password"
            returnKeyType="go"
            onSubmitEditing={submit}
            error={fieldErrors.password}
          />
          {signIn.isError ? (
            <Text color={theme.color.status.fail} accessibilityRole="alert" testID="sign-in-error">
              {describeError(signIn.error)}
            </Text>
          ) : null}
          <Button label="Sign in" variant="primary" onPress={submit} busy={signIn.isPending} testID="sign-in-submit" />
        </Card>

        {demo.data && demo.data.length > 0 ? (
          <Card title="Demo accounts on this install" subtitle="Northfold Motion, a fictional team. Choose one to fill the form.">
            <View style={{ gap: theme.space.s }}>
              {demo.data.map((a) => (
                <Pressable
                  key={a.email}
                  testID={`demo-${a.role}`}
                  accessibilityRole="button"
                  accessibilityLabel={`Fill in the demo ${a.role}, ${a.name}`}
                  onPress={() => {
                    setEmail(a.email);
                    setPassword(a.password);
                    setFieldErrors({});
                  }}
                  style={(state) => {
                    const hovered = isHovered(state);
                    return {
                      minHeight: 48,
                      flexDirection: 'row',
                      alignItems: 'center',
                      justifyContent: 'space-between',
                      gap: theme.space.m,
                      paddingHorizontal: theme.space.m,
                      borderWidth: 1,
                      borderColor: email === a.email ? theme.color.accent : theme.color.hairline,
                      borderRadius: theme.radius,
                      backgroundColor: email === a.email || hovered ? theme.color.accentSoft : theme.color.card,
                    };
                  }}
                >
                  <View style={{ flexShrink: 1 }}>
                    <Text weight="semibold">{a.name}</Text>
                    <Text variant="caption" muted numberOfLines={1}>
                      {a.email}
                    </Text>
                  </View>
                  <Text variant="caption" weight="semibold" color={theme.color.accent}>
                    {ROLE_WORD[a.role] ?? a.role}
                  </Text>
                </Pressable>
              ))}
            </View>
          </Card>
        ) : null}
      </View>
    </ScrollView>
  );
}

export function flatten(error: z.ZodError): Record<string, string> {
  const out: Record<string, string> = {};
  for (const issue of error.issues) {
    const key = issue.path.map(String).join('.') || '(form)';
    if (!out[key]) out[key] = issue.message;
  }
  return out;
}
