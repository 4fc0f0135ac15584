import { View } from 'react-native';
import { Card } from '@/components/ui/Card';
import { Icon } from '@/components/ui/Icon';
import { Text } from '@/components/ui/Text';
import { useTheme } from '@/lib/theme';

export interface NoticeView {
  id: string;
  title: string;
  text: string;
  severity: string;
}

/** The high-voltage notice, in the engine's words, as a card that cannot be mistaken for a result. */
export function HighVoltageNotice({ notice }: { notice: NoticeView }) {
  const theme = useTheme();
  return (
    <Card tone="danger" testID="high-voltage-notice" accessibilityLabel={`${notice.title}. ${notice.text}`}>
      <View style={{ flexDirection: 'row', gap: theme.space.m, alignItems: 'flex-start' }} accessibilityRole="alert">
        <View
          style={{
            width: 36,
            height: 36,
            borderRadius: 18,
            backgroundColor: theme.color.danger,
            alignItems: 'center',
            justifyContent: 'center',
          }}
        >
          <Icon name="bolt" size={22} color={theme.color.card} />
        </View>
        <View style={{ flex: 1, gap: 4 }}>
          <Text variant="lead" weight="semibold" color={theme.color.danger}>
            {notice.title}
          </Text>
          <Text>{notice.text}</Text>
        </View>
      </View>
    </Card>
  );
}

/** Other notices (information, cautions) in a quieter style. */
export function NoticeLine({ notice }: { notice: NoticeView }) {
  const theme = useTheme();
  const tone = notice.severity === 'warning' || notice.severity === 'caution' ? 'warn' : 'not-checked';
  return (
    <View style={{ flexDirection: 'row', gap: theme.space.s, alignItems: 'flex-start' }} testID={`notice-${notice.id}`}>
      <Icon name={tone === 'warn' ? 'warn' : 'not-checked'} size={16} color={theme.color.status[tone]} />
      <Text variant="caption" style={{ flex: 1 }}>
        <Text variant="caption" weight="semibold">
          {notice.title}.{' '}
        </Text>
        {notice.text}
      </Text>
    </View>
  );
}
