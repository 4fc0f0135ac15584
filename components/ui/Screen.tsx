import type { ReactNode } from 'react';
import { ScrollView, View } from 'react-native';
import { useLayout, useTheme } from '@/lib/theme';
import { Text } from './Text';

/** A screen's body inside the shell: a title row and a scrolling column of the right width. */
export function Screen({
  title,
  subtitle,
  actions,
  children,
  maxWidth = 1200,
  testID,
  scroll = true,
}: {
  title: string;
  subtitle?: string;
  actions?: ReactNode;
  children: ReactNode;
  maxWidth?: number;
  testID?: string;
  scroll?: boolean;
}) {
  const theme = useTheme();
  const layout = useLayout();
  const pad = layout.isNarrow ? theme.space.l : theme.space.xl;
  const body = (
    <View style={{ width: '100%', maxWidth, alignSelf: 'center', padding: pad, gap: theme.space.l }}>
      <View
        style={{
          flexDirection: layout.isNarrow ? 'column' : 'row',
          alignItems: layout.isNarrow ? 'stretch' : 'center',
          justifyContent: 'space-between',
          gap: theme.space.m,
        }}
      >
        <View style={{ flexShrink: 1, gap: 2 }}>
          <Text variant={layout.isNarrow ? 'title' : 'display'} accessibilityRole="header">
            {title}
          </Text>
          {subtitle ? <Text muted>{subtitle}</Text> : null}
        </View>
        {actions ? <View style={{ flexDirection: 'row', flexWrap: 'wrap', gap: theme.space.s }}>{actions}</View> : null}
      </View>
      {children}
    </View>
  );
  if (!scroll)
    return (
      <View testID={testID} style={{ flex: 1 }}>
        {body}
      </View>
    );
  return (
    <ScrollView testID={testID} style={{ flex: 1 }} contentContainerStyle={{ flexGrow: 1 }} keyboardShouldPersistTaps="handled">
      {body}
    </ScrollView>
  );
}
