import { Pressable, View } from 'react-native';
import { useTheme, type StatusKind } from '@/lib/theme';
import { Icon, type IconName } from './Icon';
import { Text } from './Text';

export interface ChipProps {
  label: string;
  tone?: StatusKind | 'accent' | 'neutral';
  icon?: IconName;
  selected?: boolean;
  onPress?: () => void;
  accessibilityLabel?: string;
  testID?: string;
}

/** A small label: a design's state in a list, or a filter when it can be pressed. */
export function Chip({ label, tone = 'neutral', icon, selected, onPress, accessibilityLabel, testID }: ChipProps) {
  const theme = useTheme();
  const c = theme.color;
  const fg = tone === 'neutral' ? c.mutedInk : tone === 'accent' ? c.accent : c.status[tone];
  const bg = selected ? c.accentSoft : tone === 'neutral' ? c.paper : tone === 'accent' ? c.accentSoft : c.statusSoft[tone];
  const body = (
    <View
      style={{
        flexDirection: 'row',
        alignItems: 'center',
        gap: 4,
        paddingHorizontal: 8,
        paddingVertical: 2,
        borderRadius: theme.radius,
        backgroundColor: bg,
        borderWidth: 1,
        borderColor: selected ? c.accent : 'transparent',
        minHeight: onPress ? 36 : undefined,
      }}
    >
      {icon ? <Icon name={icon} size={13} color={fg} /> : null}
      <Text variant="caption" weight="semibold" color={selected ? c.accent : fg}>
        {label}
      </Text>
    </View>
  );
  if (!onPress) {
    return (
      <View testID={testID} accessibilityLabel={accessibilityLabel}>
        {body}
      </View>
    );
  }
  return (
    <Pressable
      onPress={onPress}
      accessibilityRole="button"
      accessibilityState={{ selected: !!selected }}
      accessibilityLabel={accessibilityLabel ?? label}
      testID={testID}
      style={{ minHeight: 44, justifyContent: 'center' }}
    >
      {body}
    </Pressable>
  );
}
