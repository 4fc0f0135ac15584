import { View } from 'react-native';
import { useTheme, type StatusKind } from '@/lib/theme';
import { Icon } from './Icon';
import { Text } from './Text';

export const STATUS_WORD: Record<StatusKind, string> = {
  pass: 'pass',
  warn: 'warn',
  fail: 'fail',
  'not-checked': 'not checked',
};

/** A margin's status: always the icon and the word, never colour alone. */
export function StatusBadge({
  status,
  size = 'body',
  testID,
}: {
  status: StatusKind;
  size?: 'caption' | 'body';
  testID?: string;
}) {
  const theme = useTheme();
  const colour = theme.color.status[status];
  return (
    <View
      testID={testID}
      accessibilityLabel={`Status: ${STATUS_WORD[status]}`}
      style={{ flexDirection: 'row', alignItems: 'center', gap: 4 }}
    >
      <Icon name={status} size={size === 'caption' ? 14 : 16} color={colour} />
      <Text variant={size} weight="semibold" color={colour}>
        {STATUS_WORD[status]}
      </Text>
    </View>
  );
}
