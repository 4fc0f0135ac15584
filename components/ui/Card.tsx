import type { ReactNode } from 'react';
import { View, type StyleProp, type ViewStyle } from 'react-native';
import { useTheme } from '@/lib/theme';
import { Text } from './Text';

export interface CardProps {
  title?: string;
  /** A short line under the title. */
  subtitle?: string;
  right?: ReactNode;
  children?: ReactNode;
  style?: StyleProp<ViewStyle>;
  testID?: string;
  accessibilityLabel?: string;
  tone?: 'plain' | 'danger';
}

/** The one elevation level: a white sheet with a hairline and a soft shadow. */
export function Card({ title, subtitle, right, children, style, testID, accessibilityLabel, tone = 'plain' }: CardProps) {
  const theme = useTheme();
  const danger = tone === 'danger';
  return (
    <View
      testID={testID}
      accessibilityLabel={accessibilityLabel}
      style={[
        {
          backgroundColor: danger ? theme.color.dangerSoft : theme.color.card,
          borderColor: danger ? theme.color.danger : theme.color.hairline,
          borderWidth: danger ? 2 : 1,
          borderRadius: theme.radius,
          padding: theme.space.l,
          gap: theme.space.m,
          boxShadow: `0 1px 3px ${theme.color.shadow}`,
        },
        style,
      ]}
    >
      {title || right ? (
        <View style={{ flexDirection: 'row', alignItems: 'flex-start', justifyContent: 'space-between', gap: theme.space.m }}>
          <View style={{ flexShrink: 1, gap: 2 }}>
            {title ? (
              <Text variant="lead" weight="semibold" accessibilityRole="header" color={danger ? theme.color.danger : undefined}>
                {title}
              </Text>
            ) : null}
            {subtitle ? (
              <Text variant="caption" muted>
                {subtitle}
              </Text>
            ) : null}
          </View>
          {right}
        </View>
      ) : null}
      {children}
    </View>
  );
}
