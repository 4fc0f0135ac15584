import { useState } from 'react';
import { ScrollView, View } from 'react-native';
import { Card } from '@/components/ui/Card';
import { Chip } from '@/components/ui/Chip';
import { EmptyState, ErrorNotice, Loading } from '@/components/ui/States';
import { Text } from '@/components/ui/Text';
import { stampText } from '@/components/ui/format';
import { useAudit } from '@/lib/queries/team';
import { useLayout, useTheme } from '@/lib/theme';

const FILTERS = [
  { value: '', label: 'Everything' },
  { value: 'auth.sign-in', label: 'Sign-ins' },
  { value: 'revision.saved', label: 'Revisions' },
  { value: 'review.requested', label: 'Review requests' },
  { value: 'review.approved', label: 'Approvals' },
  { value: 'derating.changed', label: 'Policy changes' },
];

function detailText(details: unknown): string {
  if (details === null || details === undefined) return '';
  const text = JSON.stringify(details);
  return text.length > 160 ? `${text.slice(0, 157)}…` : text;
}

export function AuditSection() {
  const theme = useTheme();
  const layout = useLayout();
  const [action, setAction] = useState('');
  const audit = useAudit(action);
  return (
    <Card title="Audit log" subtitle="Who did what, newest first. Entries are never edited." testID="audit">
      <View style={{ flexDirection: 'row', flexWrap: 'wrap', gap: theme.space.s }}>
        {FILTERS.map((f) => (
          <Chip key={f.value} label={f.label} selected={action === f.value} onPress={() => setAction(f.value)} />
        ))}
      </View>
      {audit.isPending ? (
        <Loading label="Loading the audit log" />
      ) : audit.isError ? (
        <ErrorNotice error={audit.error} onRetry={() => audit.refetch()} />
      ) : audit.data.length === 0 ? (
        <EmptyState icon="history" title="No entries." />
      ) : layout.isNarrow ? (
        audit.data.map((e) => (
          <View
            key={e.id}
            style={{ paddingVertical: theme.space.s, borderTopWidth: 1, borderTopColor: theme.color.hairline, gap: 2 }}
          >
            <Text weight="semibold">{e.action}</Text>
            <Text variant="caption" muted>
              {stampText(e.createdAt)} · {e.actorEmail ?? 'system'}
              {e.entityType ? ` · ${e.entityType}` : ''}
            </Text>
            {e.details ? (
              <Text variant="caption" mono muted numberOfLines={3}>
                {detailText(e.details)}
              </Text>
            ) : null}
          </View>
        ))
      ) : (
        <ScrollView horizontal>
          <View role="table" accessibilityLabel="Audit log">
            <View role="row" style={{ flexDirection: 'row', borderBottomWidth: 1, borderBottomColor: theme.color.hairline }}>
              {[
                ['When', 170],
                ['Who', 220],
                ['Action', 190],
                ['On', 150],
                ['Details', 380],
              ].map(([t, w]) => (
                <View key={t as string} role="columnheader" style={{ width: w as number, padding: 6 }}>
                  <Text variant="caption" weight="semibold" muted>
                    {t}
                  </Text>
                </View>
              ))}
            </View>
            {audit.data.map((e) => (
              <View
                key={e.id}
                role="row"
                style={{ flexDirection: 'row', borderBottomWidth: 1, borderBottomColor: theme.color.hairline }}
              >
                <Cell w={170} text={stampText(e.createdAt)} />
                <Cell w={220} text={e.actorEmail ?? 'system'} />
                <Cell w={190} text={e.action} mono />
                <Cell w={150} text={e.entityType ?? ''} />
                <Cell w={380} text={detailText(e.details)} mono muted />
              </View>
            ))}
          </View>
        </ScrollView>
      )}
    </Card>
  );
}

function Cell({ w, text, mono, muted }: { w: number; text: string; mono?: boolean; muted?: boolean }) {
  return (
    <View role="cell" style={{ width: w, padding: 6 }}>
      <Text variant="caption" mono={mono} muted={muted}>
        {text}
      </Text>
    </View>
  );
}
