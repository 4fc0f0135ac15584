import { Link, Stack } from 'expo-router';
import { View } from 'react-native';
import { Text } from '@/components/ui/Text';
import { useTheme } from '@/lib/theme';

export default function NotFound() {
  const theme = useTheme();
  return (
    <View style={{ flex: 1, alignItems: 'center', justifyContent: 'center', padding: theme.space.xl, gap: theme.space.m }}>
      <Stack.Screen options={{ title: 'Not found' }} />
      <Text variant="title">There is no page at this address.</Text>
      <Link
        href="/designs"
        style={{
          color: theme.color.accent,
          fontFamily: theme.fonts.semibold,
          fontSize: theme.type.lead,
          minHeight: 44,
          paddingVertical: 12,
        }}
      >
        Go to designs
      </Link>
    </View>
  );
}
