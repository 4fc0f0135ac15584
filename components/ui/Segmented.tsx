import { Pressable, ScrollView, View } from 'react-native';
import { useTheme } from '@/lib/theme';
import { Text } from './Text';

export interface SegmentedOption<T extends string> {
  value: T;
  label: string;
}

/** A row of mutually exclusive choices; scrolls sideways inside itself on a narrow screen. */
export function Segmented<T extends string>({
  options,
  value,
  onChange,
  accessibilityLabel,
  testID,
}: {
  options: SegmentedOption<T>[];
  value: T;
  onChange: (value: T) => void;
  accessibilityLabel: string;
  testID?: string;
}) {
  const theme = useTheme();
  const c = theme.color;
  return (
    <ScrollView horizontal showsHorizontalScrollIndicator={false} style={{ flexGrow: 0 }} testID={testID}>
      <View
        accessibilityRole="tablist"
        accessibilityLabel={accessibilityLabel}
        style={{ flexDirection: 'row', gap: 4, padding: 2, borderRadius: theme.radius, backgroundColor: c.hairline }}
      >
        {options.map((o) => {
          const selected = o.value === value;
          return (
            <Pressable
              key={o.value}
              onPress={() => onChange(o.value)}
              accessibilityRole="tab"
              accessibilityState={{ selected }}
              accessibilityLabel={o.label}
              style={{
                minHeight: 40,
                paddingHorizontal: theme.space.m,
                justifyContent: 'center',
                borderRadius: theme.radius - 1,
                backgroundColor: selected ? c.card : 'transparent',
              }}
            >
              <Text variant="body" weight={selected ? 'semibold' : 'regular'} color={selected ? c.accent : c.mutedInk}>
                {o.label}
              </Text>
            </Pressable>
          );
        })}
      </View>
    </ScrollView>
  );
}
