import { useRouter } from 'expo-router';
import { Linking, Platform, View } from 'react-native';
import { Text } from '@/components/ui/Text';
import { stampText } from '@/components/ui/format';
import type { MailMessage } from '@/lib/contracts';
import { useTheme } from '@/lib/theme';

const URL_RE = /(https?:\/\/[^\s<>"')]+)/g;
/** Paths of this app that a message may link to; they open inside the app, whatever host the server wrote. */
const IN_APP = /^\/(reviews|designs|invite|team|mail)(\/|$|\?)/;

export function inAppPath(url: string): string | null {
  try {
    const u = new URL(url);
    const path = u.pathname + u.search;
    return IN_APP.test(path) ? path : null;
  } catch {
    return null;
  }
}

/** A message's plain text with its links made pressable. */
export function MailMessageView({ message }: { message: MailMessage }) {
  const theme = useTheme();
  const router = useRouter();
  const parts = message.text.split(URL_RE);
  return (
    <View style={{ gap: theme.space.s }} testID={`mail-body-${message.id}`}>
      <Text variant="caption" muted>
        To {message.to} · {stampText(message.createdAt)} · {message.status}
      </Text>
      <Text selectable>
        {parts.map((part, k) => {
          if (k % 2 === 0) return part;
          const path = inAppPath(part);
          return (
            <Text
              key={k}
              accessibilityRole="link"
              color={theme.color.accent}
              weight="semibold"
              style={{ textDecorationLine: 'underline' }}
              testID={path ? `mail-link-${path.split('/')[1]}` : undefined}
              onPress={() => {
                if (path) router.push(path as never);
                else if (Platform.OS === 'web') window.open(part, '_blank', 'noopener');
                else void Linking.openURL(part);
              }}
            >
              {path ?? part}
            </Text>
          );
        })}
      </Text>
      {message.error ? (
        <Text variant="caption" color={theme.color.status.fail}>
          Delivery failed: {message.error}
        </Text>
      ) : null}
    </View>
  );
}
