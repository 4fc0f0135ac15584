import { isHovered } from './webProps';
import { useState, type ReactNode } from 'react';
import { Modal, Pressable, View } from 'react-native';
import { useTheme } from '@/lib/theme';
import { Text } from './Text';

export interface MenuEntry {
  key: string;
  label: string;
  detail?: string;
  selected?: boolean;
  onPress: () => void;
  tone?: 'plain' | 'danger';
}

/**
 * A trigger that opens a small list under the header's right or left edge. A modal layer catches
 * the outside press and Escape closes it, so the menu works with a mouse, a finger and a keyboard.
 */
export function Menu({
  trigger,
  entries,
  header,
  align = 'right',
  accessibilityLabel,
  testID,
}: {
  trigger: (open: () => void, isOpen: boolean) => ReactNode;
  entries: MenuEntry[];
  header?: ReactNode;
  align?: 'left' | 'right';
  accessibilityLabel: string;
  testID?: string;
}) {
  const theme = useTheme();
  const [open, setOpen] = useState(false);
  return (
    <>
      {trigger(() => setOpen(true), open)}
      <Modal transparent visible={open} onRequestClose={() => setOpen(false)} animationType="none">
        <Pressable style={{ flex: 1 }} onPress={() => setOpen(false)} accessibilityLabel="Close menu" accessibilityRole="button">
          <View
            testID={testID}
            accessibilityRole="menu"
            accessibilityLabel={accessibilityLabel}
            style={{
              position: 'absolute',
              top: 56,
              [align]: 8,
              minWidth: 240,
              maxWidth: 320,
              backgroundColor: theme.color.card,
              borderRadius: theme.radius,
              borderWidth: 1,
              borderColor: theme.color.hairline,
              boxShadow: `0 6px 20px ${theme.color.shadow}`,
              paddingVertical: 4,
            }}
          >
            {header ? (
              <View
                style={{
                  paddingHorizontal: theme.space.l,
                  paddingVertical: theme.space.m,
                  borderBottomWidth: 1,
                  borderBottomColor: theme.color.hairline,
                }}
              >
                {header}
              </View>
            ) : null}
            {entries.map((e) => (
              <Pressable
                key={e.key}
                accessibilityRole="menuitem"
                accessibilityLabel={e.label}
                accessibilityState={{ selected: !!e.selected }}
                onPress={() => {
                  setOpen(false);
                  e.onPress();
                }}
                style={(state) => {
                  const hovered = isHovered(state);
                  return {
                    minHeight: 44,
                    justifyContent: 'center',
                    paddingHorizontal: theme.space.l,
                    backgroundColor: e.selected ? theme.color.accentSoft : hovered ? theme.color.paper : 'transparent',
                  };
                }}
              >
                <Text weight={e.selected ? 'semibold' : 'regular'} color={e.tone === 'danger' ? theme.color.danger : undefined}>
                  {e.label}
                </Text>
                {e.detail ? (
                  <Text variant="caption" muted>
                    {e.detail}
                  </Text>
                ) : null}
              </Pressable>
            ))}
          </View>
        </Pressable>
      </Modal>
    </>
  );
}
