import { useState } from 'react';
import { Pressable, View } from 'react-native';
import { Icon } from '@/components/ui/Icon';
import { Text } from '@/components/ui/Text';
import { whenText } from '@/components/ui/format';
import type { MailMessage } from '@/lib/contracts';
import { useTheme } from '@/lib/theme';
import { MailMessageView } from './MailMessageView';

/** Messages newest first; pressing one opens it in place. */
export function MailList({
  messages,
  showRecipient = false,
  testID = 'mail-list',
}: {
  messages: MailMessage[];
  showRecipient?: boolean;
  testID?: string;
}) {
  const theme = useTheme();
  const [open, setOpen] = useState<string | null>(messages[0]?.id ?? null);
  return (
    <View style={{ gap: theme.space.s }} testID={testID}>
      {messages.map((m) => {
        const isOpen = open === m.id;
        return (
          <View
            key={m.id}
            style={{
              borderWidth: 1,
              borderColor: isOpen ? theme.color.accent : theme.color.hairline,
              borderRadius: theme.radius,
              backgroundColor: theme.color.card,
            }}
          >
            <Pressable
              accessibilityRole="button"
              accessibilityState={{ expanded: isOpen }}
              aria-expanded={isOpen}
              accessibilityLabel={`${m.subject}, ${whenText(m.createdAt)}${showRecipient ? `, to ${m.to}` : ''}`}
              onPress={() => setOpen(isOpen ? null : m.id)}
              testID={`mail-${m.id}`}
              style={{ minHeight: 52, padding: theme.space.m, flexDirection: 'row', gap: theme.space.m, alignItems: 'center' }}
            >
              <Icon name="mail" size={18} color={theme.color.mutedInk} />
              <View style={{ flex: 1 }}>
                <Text weight="semibold" numberOfLines={isOpen ? undefined : 1}>
                  {m.subject}
                </Text>
                <Text variant="caption" muted numberOfLines={1}>
                  {showRecipient ? `${m.to} · ` : ''}
                  {whenText(m.createdAt)}
                </Text>
              </View>
              <Icon name={isOpen ? 'chevron-down' : 'chevron-right'} size={16} color={theme.color.mutedInk} />
            </Pressable>
            {isOpen ? (
              <View style={{ paddingHorizontal: theme.space.m, paddingBottom: theme.space.m }}>
                <MailMessageView message={m} />
              </View>
            ) : null}
          </View>
        );
      })}
    </View>
  );
}
