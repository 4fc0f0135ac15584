import { ActivityIndicator, View } from 'react-native';
import { describeError } from '@/lib/api/client';
import { useTheme } from '@/lib/theme';
import { Button } from './Button';
import { Icon, type IconName } from './Icon';
import { Text } from './Text';

export function Loading({ label = 'Loading' }: { label?: string }) {
  const theme = useTheme();
  return (
    <View style={{ padding: theme.space.xl, alignItems: 'center', gap: theme.space.s }} accessibilityLabel={label}>
      <ActivityIndicator color={theme.color.accent} />
      <Text muted>{label}…</Text>
    </View>
  );
}

/** An unexpected failure: one plain message and a way to try again. */
export function ErrorNotice({
  error,
  onRetry,
  title = 'This could not be loaded.',
}: {
  error: unknown;
  onRetry?: () => void;
  title?: string;
}) {
  const theme = useTheme();
  return (
    <View
      accessibilityRole="alert"
      style={{
        padding: theme.space.l,
        gap: theme.space.s,
        borderRadius: theme.radius,
        borderWidth: 1,
        borderColor: theme.color.status.fail,
        backgroundColor: theme.color.statusSoft.fail,
      }}
    >
      <View style={{ flexDirection: 'row', gap: 8, alignItems: 'center' }}>
        <Icon name="fail" size={16} color={theme.color.status.fail} />
        <Text weight="semibold">{title}</Text>
      </View>
      <Text muted>{describeError(error)}</Text>
      {onRetry ? <Button label="Try again" onPress={onRetry} compact style={{ alignSelf: 'flex-start' }} /> : null}
    </View>
  );
}

export function EmptyState({
  icon = 'designs',
  title,
  text,
  action,
}: {
  icon?: IconName;
  title: string;
  text?: string;
  action?: React.ReactNode;
}) {
  const theme = useTheme();
  return (
    <View style={{ padding: theme.space.xl, alignItems: 'center', gap: theme.space.m }}>
      <View
        style={{
          width: 56,
          height: 56,
          borderRadius: 28,
          backgroundColor: theme.color.accentSoft,
          alignItems: 'center',
          justifyContent: 'center',
        }}
      >
        <Icon name={icon} size={28} color={theme.color.accent} />
      </View>
      <Text variant="lead" weight="semibold" align="center">
        {title}
      </Text>
      {text ? (
        <Text muted align="center" style={{ maxWidth: 420 }}>
          {text}
        </Text>
      ) : null}
      {action}
    </View>
  );
}
