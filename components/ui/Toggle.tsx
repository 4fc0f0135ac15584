import { Pressable, View } from 'react-native';
import { useTheme } from '@/lib/theme';
import { Text } from './Text';

/** An on/off switch with its label, the whole row a 44 px target. */
export function Toggle({
  label,
  value,
  onChange,
  testID,
  disabled,
}: {
  label: string;
  value: boolean;
  onChange: (next: boolean) => void;
  testID?: string;
  disabled?: boolean;
}) {
  const theme = useTheme();
  const c = theme.color;
  return (
    <Pressable
      testID={testID}
      role="switch"
      accessibilityRole="switch"
      accessibilityLabel={label}
      accessibilityState={{ checked: value, disabled: !!disabled }}
      aria-checked={value}
      disabled={disabled}
      onPress={() => onChange(!value)}
      style={{ minHeight: 44, flexDirection: 'row', alignItems: 'center', gap: theme.space.s, opacity: disabled ? 0.5 : 1 }}
    >
      <View
        style={{
          width: 38,
          height: 22,
          borderRadius: 11,
          padding: 2,
          backgroundColor: value ? c.accent : c.hairline,
          justifyContent: 'center',
        }}
      >
        <View style={{ width: 18, height: 18, borderRadius: 9, backgroundColor: c.card, marginLeft: value ? 16 : 0 }} />
      </View>
      <Text>{label}</Text>
    </Pressable>
  );
}
