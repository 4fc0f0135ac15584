import { useRouter } from 'expo-router';
import { useState } from 'react';
import { Pressable, View } from 'react-native';
import { DESIGN_STATUS } from '@/components/designs/statusWords';
import { Chip } from '@/components/ui/Chip';
import { Segmented } from '@/components/ui/Segmented';
import { EmptyState, ErrorNotice, Loading } from '@/components/ui/States';
import { Screen } from '@/components/ui/Screen';
import { Text } from '@/components/ui/Text';
import { shortHash, whenText } from '@/components/ui/format';
import { isHovered } from '@/components/ui/webProps';
import { can, useActiveTeam, useMe } from '@/lib/queries/auth';
import { useReviews, type ReviewScope } from '@/lib/queries/reviews';
import { useLayout, useTheme } from '@/lib/theme';
import { REVIEW_WORD } from './reviewWords';

export function ReviewsScreen() {
  const theme = useTheme();
  const layout = useLayout();
  const router = useRouter();
  const me = useMe();
  const { team } = useActiveTeam(me.data);
  const reviewer = can(team?.role, 'review');
  const [scope, setScope] = useState<ReviewScope>(reviewer ? 'mine' : 'all');
  const reviews = useReviews(scope);
  const rows = [...(reviews.data ?? [])].sort(
    (a, b) => (a.state === 'requested' ? 0 : 1) - (b.state === 'requested' ? 0 : 1) || b.createdAt.localeCompare(a.createdAt),
  );

  return (
    <Screen title="Reviews" subtitle="Sign-offs of saved revisions: open requests first." testID="reviews-screen">
      <Segmented
        accessibilityLabel="Which reviews"
        value={scope}
        onChange={setScope}
        options={[
          { value: 'mine', label: 'Assigned to me' },
          { value: 'all', label: 'Everything in the team' },
        ]}
      />
      {reviews.isPending ? (
        <Loading label="Loading reviews" />
      ) : reviews.isError ? (
        <ErrorNotice error={reviews.error} onRetry={() => reviews.refetch()} />
      ) : rows.length === 0 ? (
        <EmptyState
          icon="reviews"
          title={scope === 'mine' ? 'Nothing is waiting for you.' : 'No reviews yet.'}
          text="An engineer requests a review from a design's revisions; the reviewer also gets an e-mail (see My mail)."
        />
      ) : (
        <View style={{ gap: theme.space.s }} role="list">
          {rows.map((r) => {
            const w = REVIEW_WORD[r.state];
            const status = DESIGN_STATUS[r.worstStatus];
            return (
              <Pressable
                key={r.id}
                role="listitem"
                accessibilityRole="link"
                accessibilityLabel={`${r.designName}, revision ${r.revisionSequence}, ${w.label}, reviewer ${r.reviewer?.name ?? 'former member'}`}
                testID={`review-row-${r.id}`}
                onPress={() => router.push(`/reviews/${r.id}` as never)}
                style={(s) => ({
                  padding: theme.space.l,
                  gap: 4,
                  borderWidth: 1,
                  borderColor: theme.color.hairline,
                  borderRadius: theme.radius,
                  backgroundColor: isHovered(s) ? theme.color.accentSoft : theme.color.card,
                  minHeight: 56,
                })}
              >
                <View
                  style={{
                    flexDirection: layout.isNarrow ? 'column' : 'row',
                    justifyContent: 'space-between',
                    gap: theme.space.s,
                  }}
                >
                  <Text weight="semibold" variant="lead">
                    {r.designName} · revision {r.revisionSequence}
                  </Text>
                  <View style={{ flexDirection: 'row', gap: theme.space.s, flexWrap: 'wrap' }}>
                    <Chip label={w.label} tone={w.tone} icon={w.icon} />
                    <Chip label={status.label} tone={status.tone} icon={status.icon} />
                  </View>
                </View>
                <Text variant="caption" muted>
                  {r.projectName} · {shortHash(r.revisionSha256)} · requested by {r.requestedBy?.name ?? '—'}{' '}
                  {whenText(r.createdAt)} · reviewer {r.reviewer?.name ?? '—'}
                </Text>
                {r.note ? <Text variant="caption">{r.note}</Text> : null}
              </Pressable>
            );
          })}
        </View>
      )}
    </Screen>
  );
}
