import { useRouter } from 'expo-router';
import { useMemo, useState } from 'react';
import { Pressable, View } from 'react-native';
import { Button } from '@/components/ui/Button';
import { Chip } from '@/components/ui/Chip';
import { Icon } from '@/components/ui/Icon';
import { EmptyState, ErrorNotice, Loading } from '@/components/ui/States';
import { Screen } from '@/components/ui/Screen';
import { Text } from '@/components/ui/Text';
import { TextField } from '@/components/ui/TextField';
import { whenText } from '@/components/ui/format';
import { isHovered } from '@/components/ui/webProps';
import type { DesignStatus, DesignSummary } from '@/lib/contracts';
import { can, useActiveTeam, useMe } from '@/lib/queries/auth';
import { useDesigns } from '@/lib/queries/designs';
import { useLayout, useTheme } from '@/lib/theme';
import { NewDesignPanel } from './NewDesignPanel';
import { DESIGN_STATUS, REVIEW_STATE } from './statusWords';

type Filter = 'all' | DesignStatus | 'under-review' | 'approved';

const FILTERS: { value: Filter; label: string }[] = [
  { value: 'all', label: 'All' },
  { value: 'fail', label: 'Failures' },
  { value: 'warn', label: 'Warnings' },
  { value: 'pass', label: 'Passes' },
  { value: 'under-review', label: 'Under review' },
  { value: 'approved', label: 'Approved' },
];

function matches(d: DesignSummary, filter: Filter): boolean {
  if (filter === 'all') return true;
  if (filter === 'under-review') return d.reviewState === 'requested';
  if (filter === 'approved') return d.reviewState === 'approved';
  return d.status === filter;
}

export function DesignsScreen() {
  const theme = useTheme();
  const me = useMe();
  const { team } = useActiveTeam(me.data);
  const [search, setSearch] = useState('');
  const [filter, setFilter] = useState<Filter>('all');
  const [creating, setCreating] = useState(false);
  const designs = useDesigns(search);
  const mayEdit = can(team?.role, 'edit');

  const shown = useMemo(() => (designs.data ?? []).filter((d) => matches(d, filter)), [designs.data, filter]);

  return (
    <Screen
      title="Designs"
      subtitle={team ? `${team.name} · what each design's latest revision shows` : undefined}
      testID="designs-screen"
      actions={
        mayEdit && !creating ? (
          <Button label="New design" icon="plus" variant="primary" onPress={() => setCreating(true)} testID="new-design" />
        ) : null
      }
    >
      {creating ? <NewDesignPanel onClose={() => setCreating(false)} /> : null}

      <View style={{ gap: theme.space.s }}>
        <TextField
          label="Search designs"
          placeholder="Name, such as depot charger"
          value={search}
          onChangeText={setSearch}
          testID="design-search"
          autoCapitalize="none"
        />
        <View style={{ flexDirection: 'row', flexWrap: 'wrap', gap: theme.space.s }} accessibilityLabel="Show designs by status">
          {FILTERS.map((f) => (
            <Chip
              key={f.value}
              label={f.label}
              selected={filter === f.value}
              onPress={() => setFilter(f.value)}
              testID={`filter-${f.value}`}
            />
          ))}
        </View>
      </View>

      {designs.isPending ? (
        <Loading label="Loading designs" />
      ) : designs.isError ? (
        <ErrorNotice error={designs.error} onRetry={() => designs.refetch()} />
      ) : shown.length === 0 ? (
        <EmptyState
          title={search || filter !== 'all' ? 'No design matches.' : 'No designs yet.'}
          text={
            search || filter !== 'all'
              ? 'Clear the search or choose All to see every design.'
              : mayEdit
                ? 'Start from a preset: a DC link with precharge, an LC input filter, a hot-plug onto a charged bus or a switch turn-off with a snubber.'
                : 'An engineer in your team creates designs; they appear here.'
          }
        />
      ) : (
        <View style={{ gap: theme.space.s }} role="list" accessibilityLabel="Designs">
          {shown.map((d) => (
            <DesignRow key={d.id} design={d} />
          ))}
        </View>
      )}
    </Screen>
  );
}

function DesignRow({ design }: { design: DesignSummary }) {
  const theme = useTheme();
  const layout = useLayout();
  const router = useRouter();
  const status = DESIGN_STATUS[design.status];
  const review = REVIEW_STATE[design.reviewState];
  return (
    <Pressable
      role="listitem"
      accessibilityRole="link"
      accessibilityLabel={`${design.name}, ${design.projectName}, ${status.label}${review ? ', ' + review.label : ''}, changed ${whenText(design.updatedAt)}`}
      onPress={() => router.push(`/designs/${design.id}`)}
      testID={`design-row-${design.id}`}
      style={(state) => ({
        backgroundColor: isHovered(state) ? theme.color.accentSoft : theme.color.card,
        borderWidth: 1,
        borderColor: theme.color.hairline,
        borderRadius: theme.radius,
        padding: theme.space.l,
        minHeight: 64,
        flexDirection: layout.isNarrow ? 'column' : 'row',
        alignItems: layout.isNarrow ? 'stretch' : 'center',
        gap: theme.space.s,
      })}
    >
      <View style={{ flex: 1, gap: 2 }}>
        <Text weight="semibold" variant="lead">
          {design.name}
        </Text>
        <Text variant="caption" muted>
          {design.projectName} ·{' '}
          {design.revisionCount === 0
            ? 'no revision yet'
            : `${design.revisionCount} revision${design.revisionCount === 1 ? '' : 's'}`}{' '}
          · changed {whenText(design.updatedAt)}
        </Text>
      </View>
      <View style={{ flexDirection: 'row', flexWrap: 'wrap', gap: theme.space.s, alignItems: 'center' }}>
        <Chip label={status.label} tone={status.tone} icon={status.icon} />
        {review ? <Chip label={review.label} tone={review.tone} icon={review.icon} /> : null}
        {layout.isNarrow ? null : <Icon name="chevron-right" size={18} color={theme.color.mutedInk} />}
      </View>
    </Pressable>
  );
}
