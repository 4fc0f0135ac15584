import { useLocalSearchParams, useRouter } from 'expo-router';
import { useState } from 'react';
import { Pressable, View } from 'react-native';
import { DESIGN_STATUS } from '@/components/designs/statusWords';
import { Button } from '@/components/ui/Button';
import { Card } from '@/components/ui/Card';
import { Chip } from '@/components/ui/Chip';
import { EmptyState, ErrorNotice, Loading } from '@/components/ui/States';
import { Screen } from '@/components/ui/Screen';
import { Text } from '@/components/ui/Text';
import { stampText, whenText } from '@/components/ui/format';
import { isHovered } from '@/components/ui/webProps';
import type { RevisionSummary } from '@/lib/contracts';
import { can, useMe } from '@/lib/queries/auth';
import { useDesign, useRevisions } from '@/lib/queries/designs';
import { useDesignReviews } from '@/lib/queries/reviews';
import { useLayout, useTheme } from '@/lib/theme';
import { DownloadButtons } from './DownloadButtons';
import { RequestReviewCard } from './RequestReviewCard';
import { REVIEW_WORD } from './reviewWords';

/** A design's revisions (immutable, named by hash), their files, and its reviews. */
export function RevisionsScreen({ id }: { id: string }) {
  const theme = useTheme();
  const layout = useLayout();
  const router = useRouter();
  const { request } = useLocalSearchParams<{ request?: string }>();
  const me = useMe();
  const design = useDesign(id);
  const revisions = useRevisions(id);
  const reviews = useDesignReviews(id);
  const role = me.data?.teams.find((t) => t.id === design.data?.teamId)?.role;
  const mayRequest = can(role, 'edit');
  const [requesting, setRequesting] = useState<string | null>(typeof request === 'string' ? request : null);

  if (design.isPending || revisions.isPending) return <Loading label="Loading revisions" />;
  if (design.isError || revisions.isError)
    return (
      <View style={{ padding: 16 }}>
        <ErrorNotice error={design.error ?? revisions.error} onRetry={() => (design.refetch(), revisions.refetch())} />
      </View>
    );
  const list = revisions.data;
  const latest = list[0] ?? null;
  const target = list.find((r) => r.id === requesting) ?? null;

  return (
    <Screen
      title="Revisions and review"
      subtitle={design.data.name}
      testID="revisions-screen"
      actions={
        <Button
          label="Back to the design"
          icon="chevron-left"
          onPress={() => router.push(`/designs/${id}` as never)}
          testID="back-to-design"
        />
      }
    >
      {target && mayRequest ? <RequestReviewCard revision={target} designId={id} /> : null}

      <View style={{ flexDirection: layout.isWide ? 'row' : 'column', gap: theme.space.l, alignItems: 'flex-start' }}>
        <View style={{ flex: 3, width: layout.isWide ? undefined : '100%', gap: theme.space.s }}>
          <Text variant="lead" weight="semibold" accessibilityRole="header">
            History
          </Text>
          {list.length === 0 ? (
            <EmptyState
              icon="history"
              title="No revision yet."
              text="Save a revision from the design to record it with its check; reviews and reports work on revisions."
            />
          ) : (
            list.map((r) => (
              <RevisionRow
                key={r.id}
                revision={r}
                designName={design.data.name}
                latest={r.id === latest?.id}
                mayRequest={mayRequest}
                onRequest={() => setRequesting(r.id)}
              />
            ))
          )}
        </View>
        <View style={{ flex: 2, width: layout.isWide ? undefined : '100%', gap: theme.space.s }}>
          <Text variant="lead" weight="semibold" accessibilityRole="header">
            Reviews of this design
          </Text>
          {reviews.isPending ? (
            <Loading label="Loading reviews" />
          ) : reviews.isError ? (
            <ErrorNotice error={reviews.error} onRetry={() => reviews.refetch()} />
          ) : reviews.data.length === 0 ? (
            <Text muted>No review has been requested yet.</Text>
          ) : (
            reviews.data.map((rv) => {
              const w = REVIEW_WORD[rv.state];
              return (
                <Pressable
                  key={rv.id}
                  accessibilityRole="link"
                  accessibilityLabel={`Review by ${rv.reviewer?.name ?? 'a former member'} of revision ${rv.revisionSequence}: ${w.label}`}
                  onPress={() => router.push(`/reviews/${rv.id}` as never)}
                  style={(s) => ({
                    padding: theme.space.m,
                    gap: 4,
                    borderWidth: 1,
                    borderColor: theme.color.hairline,
                    borderRadius: theme.radius,
                    backgroundColor: isHovered(s) ? theme.color.accentSoft : theme.color.card,
                    minHeight: 44,
                  })}
                >
                  <View style={{ flexDirection: 'row', justifyContent: 'space-between', gap: theme.space.s, flexWrap: 'wrap' }}>
                    <Text weight="semibold">{rv.reviewer?.name ?? 'A former member'}</Text>
                    <Chip label={w.label} tone={w.tone} icon={w.icon} />
                  </View>
                  <Text variant="caption" muted>
                    Revision {rv.revisionSequence} · requested by {rv.requestedBy?.name ?? '—'} {whenText(rv.createdAt)}
                  </Text>
                  {rv.decisionReason ? <Text variant="caption">“{rv.decisionReason}”</Text> : null}
                </Pressable>
              );
            })
          )}
        </View>
      </View>
    </Screen>
  );
}

function RevisionRow({
  revision,
  designName,
  latest,
  mayRequest,
  onRequest,
}: {
  revision: RevisionSummary;
  designName: string;
  latest: boolean;
  mayRequest: boolean;
  onRequest: () => void;
}) {
  const theme = useTheme();
  const status = DESIGN_STATUS[revision.worstStatus];
  return (
    <Card testID={`revision-${revision.sequence}`}>
      <View
        style={{
          flexDirection: 'row',
          flexWrap: 'wrap',
          gap: theme.space.s,
          alignItems: 'center',
          justifyContent: 'space-between',
        }}
      >
        <Text variant="lead" weight="semibold">
          Revision {revision.sequence}
          {latest ? ' (latest)' : ''}
        </Text>
        <Chip label={status.label} tone={status.tone} icon={status.icon} />
      </View>
      <Text
        mono
        variant="caption"
        selectable
        testID={`revision-${revision.sequence}-sha`}
        accessibilityLabel={`SHA-256 ${revision.sha256}`}
        style={{ flexWrap: 'wrap' }}
      >
        sha256 {revision.sha256}
      </Text>
      <Text variant="caption" muted>
        {revision.author?.name ?? 'A former member'} · {stampText(revision.createdAt)} · engine {revision.engineVersion}
      </Text>
      {revision.note ? <Text>{revision.note}</Text> : null}
      <DownloadButtons revisionId={revision.id} designName={designName} sequence={revision.sequence} />
      {mayRequest && latest ? (
        <Button
          label="Request a review"
          variant="primary"
          compact
          onPress={onRequest}
          testID={`request-review-${revision.sequence}`}
          style={{ alignSelf: 'flex-start' }}
        />
      ) : null}
    </Card>
  );
}
