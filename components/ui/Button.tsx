import type { ReactNode } from 'react';
import { ActivityIndicator, Pressable, StyleSheet, View, type StyleProp, type ViewStyle } from 'react-native';
import { useTheme } from '@/lib/theme';
import { Icon, type IconName } from './Icon';
import { isHovered } from './webProps';
import { Text } from './Text';

export interface ButtonProps {
  label: string;
  onPress?: () => void;
  variant?: 'primary' | 'secondary' | 'quiet' | 'danger';
  icon?: IconName;
  disabled?: boolean;
  busy?: boolean;
  /** Read by screen readers when the visible label alone is not enough. */
  accessibilityLabel?: string;
  testID?: string;
  style?: StyleProp<ViewStyle>;
  compact?: boolean;
  children?: ReactNode;
}

export function Button({
  label,
  onPress,
  variant = 'secondary',
  icon,
  disabled,
  busy,
  accessibilityLabel,
  testID,
  style,
  compact,
}: ButtonProps) {
  const theme = useTheme();
  const c = theme.color;
  const palette = {
    primary: { bg: c.accent, fg: c.onAccent, border: c.accent },
    secondary: { bg: c.card, fg: c.accent, border: c.hairline },
    quiet: { bg: 'transparent', fg: c.accent, border: 'transparent' },
    danger: { bg: c.card, fg: c.danger, border: c.danger },
  }[variant];
  const off = disabled || busy;
  return (
    <Pressable
      onPress={off ? undefined : onPress}
      disabled={off}
      accessibilityRole="button"
      accessibilityLabel={accessibilityLabel ?? label}
      accessibilityState={{ disabled: !!off, busy: !!busy }}
      testID={testID}
      style={(state) => {
        const { pressed } = state;
        const hovered = isHovered(state);
        return [
          styles.base,
          {
            minHeight: compact ? 36 : theme.touchTarget,
            paddingHorizontal: compact ? theme.space.m : theme.space.l,
            borderRadius: theme.radius,
            backgroundColor: palette.bg,
            borderColor: palette.border,
            opacity: off ? 0.55 : pressed ? 0.8 : 1,
          },
          hovered && !off && variant !== 'primary' ? { backgroundColor: c.accentSoft } : null,
          style,
        ];
      }}
    >
      <View style={styles.row}>
        {busy ? (
          <ActivityIndicator size="small" color={palette.fg} />
        ) : icon ? (
          <Icon name={icon} size={18} color={palette.fg} />
        ) : null}
        <Text weight="semibold" color={palette.fg} numberOfLines={1}>
          {label}
        </Text>
      </View>
    </Pressable>
  );
}

const styles = StyleSheet.create({
  base: { borderWidth: 1, justifyContent: 'center', alignItems: 'center' },
  row: { flexDirection: 'row', alignItems: 'center', gap: 8 },
});
